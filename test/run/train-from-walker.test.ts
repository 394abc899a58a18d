/**
 * `cairn train --walker FILE`: training continues from the given weights (a cairn walker JSON
 * or an exported .safetensors walker) instead of a fresh walker; a walker that does not fit the
 * body is refused with exit 2 and nothing written.
 */
import { existsSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { cairn, cleanup, exportRun, ROOT, smokeRun, tempDir } from '../export/helpers.js';

const SLOW = 600_000;
let tmp = '';
let walker = '';
const STARTER = join(ROOT, 'envs/terrain/starter.json');

interface LogLine { iteration: number; progress: number }
const firstLine = (dir: string): LogLine => JSON.parse(readFileSync(join(dir, 'train-log.jsonl'), 'utf8').split('\n')[0]) as LogLine;
const train = (out: string, ...extra: string[]) => cairn(['train', '--terrain', STARTER, '--steps', '300', '--population', '8', '--workers', '0', '--quiet', '--json', '--out', out, ...extra]);

beforeAll(() => {
  const run = smokeRun();
  tmp = tempDir('train-walker');
  exportRun(run, join(tmp, 'exp'), '--only', 'all');
  const cur = JSON.parse(readFileSync(join(tmp, 'exp', 'curriculum.json'), 'utf8')) as { courses: { best: { walker: { file: string } } }[] };
  walker = join(tmp, 'exp', cur.courses[0].best.walker.file);
}, SLOW);
afterAll(cleanup);

describe('cairn train --walker', () => {
  it('starts from the given weights: its first evaluation is that walker\'s eval, and a JSON walker continues the same way', () => {
    const fromExport = join(tmp, 'from-export');
    expect(train(fromExport, '--walker', walker, '--iterations', '2').code).toBe(0);
    const alone = JSON.parse(cairn(['eval', '--terrain', STARTER, '--walker', walker, '--steps', '300', '--json']).stdout) as { progress: number };
    expect(firstLine(fromExport).progress).toBe(alone.progress);
    const fresh = join(tmp, 'fresh');
    expect(train(fresh, '--iterations', '2').code).toBe(0);
    expect(firstLine(fresh).progress).not.toBe(alone.progress);
    // Its output is a cairn walker JSON; continuing from it starts where the first training ended.
    const saved = JSON.parse(readFileSync(join(fromExport, 'walker.json'), 'utf8')) as { meta: { progress: number; from: string } };
    expect(saved.meta.from).toBe(walker);
    const again = join(tmp, 'again');
    expect(train(again, '--walker', join(fromExport, 'walker.json'), '--iterations', '1').code).toBe(0);
    expect(firstLine(again).progress).toBe(saved.meta.progress);
  }, SLOW);

  it('refuses a walker whose network does not fit the body, and --walker with --curriculum, writing nothing', () => {
    for (const [args, pattern] of [
      [['--walker', walker, '--body', join(ROOT, 'envs/bodies/stilt.json')], /made for body plan "trestle", but the body plan here is "stilt"/],
      [['--walker', join(tmp, 'none.safetensors')], /none\.safetensors/],
      [['--walker', walker, '--curriculum', join(tmp, 'exp', 'curriculum.json')], /--walker does not combine with --curriculum/],
    ] as const) {
      const out = join(tmp, 'refused');
      const r = train(out, ...args);
      expect(r.code).toBe(2);
      expect(r.stderr).toMatch(pattern);
      expect(r.stderr).not.toMatch(/^\s+at /m);
      expect(existsSync(out)).toBe(false);
    }
  }, SLOW);
});
