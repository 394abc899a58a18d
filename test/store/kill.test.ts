/**
 * SIGKILL at arbitrary moments: no handler runs, so whatever the process was doing is cut off —
 * a checkpoint half written, log lines appended ahead of the last checkpoint, a lock left
 * behind. Resuming until done must still give the same run as one never interrupted (same
 * fingerprint, byte-identical logs). The recipe checkpoints every iteration, so many kills fall
 * near a checkpoint write.
 *
 * The kill schedule is a fixed list (repeatable); where each kill lands depends on the machine's
 * speed, and nothing asserted depends on that. A second test builds the worst aftermath of a
 * kill by hand, so those leftovers are certainly covered whatever the timing.
 */
import { appendFileSync, cpSync, existsSync, readFileSync, rmSync, watch, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { checkpointPath, listCheckpoints } from '../../src/store/index.js';
import { cli, cliOk, deadPid, ensureBuilt, outcome, startCli, tempDir, tempFiles, waitFor, writeTinyRecipe, type CliResult, type Started, SLOW } from './helpers.js';

const N = 6;
let root = '';
let recipe = '';
let referenceDir = '';
let reference: Awaited<ReturnType<typeof outcome>>;

beforeAll(async () => {
  ensureBuilt();
  root = tempDir('kill');
  recipe = writeTinyRecipe(root, { checkpoint: { interval: 1, keep: 3 }, budget: { iterations: N } });
  referenceDir = join(root, 'reference');
  await cliOk(['run', recipe, '--out', referenceDir, '--workers', '1', '--quiet']);
  reference = await outcome(referenceDir);
}, SLOW);
afterAll(() => rmSync(root, { recursive: true, force: true }));

/** When to kill an invocation: a delay after its start, or the moment a checkpoint's temp file appears. */
type Trigger = { readonly delayMs: number } | { readonly checkpointAhead: number };

/**
 * One kill per invocation: the first `cairn run` is killed while checkpoint 2 is being written;
 * each `cairn resume` after it at its own moment, from start-up to mid-iteration to mid-write.
 */
const SCHEDULE: readonly Trigger[] = [{ checkpointAhead: 2 }, { delayMs: 1800 }, { checkpointAhead: 1 }, { delayMs: 900 }, { checkpointAhead: 2 }];
const WORKERS = ['1', '2', '0'];

/** Kills `run` with SIGKILL when `t` fires (unless it ends first) and returns how it ended. */
async function killWhen(run: Started, dir: string, t: Trigger, from: number): Promise<CliResult> {
  const kill = (): void => { run.child.kill('SIGKILL'); };
  if ('delayMs' in t) {
    const timer = setTimeout(kill, t.delayMs);
    return run.done.finally(() => clearTimeout(timer));
  }
  // The temp file of checkpoint `from + ahead`, e.g. .tmp-ckpt-000000002.json-<pid>: kill from inside the watcher's callback.
  const name = `.tmp-${checkpointPath(dir, from + t.checkpointAhead).split('/').pop()}`;
  await waitFor('the checkpoints folder', () => existsSync(join(dir, 'checkpoints')) || run.child.exitCode !== null);
  const watcher = watch(join(dir, 'checkpoints'), (_, file) => { if (file?.startsWith(name)) kill(); });
  return run.done.finally(() => watcher.close());
}

describe('killing a run with SIGKILL again and again', () => {
  it('resumes each time and ends identical to the uninterrupted run', async () => {
    const dir = join(root, 'killed');
    const history: string[] = [];
    for (const [i, trigger] of SCHEDULE.entries()) {
      const from = listCheckpoints(dir)[0] ?? 0;
      const args = i === 0 ? ['run', recipe, '--out', dir] : ['resume', dir];
      const run = startCli([...args, '--workers', WORKERS[i % 3], '--quiet']);
      const r = await killWhen(run, dir, trigger, from);
      history.push(`${args[0]} from ${from}: ${r.signal ?? r.code}`);
      // Killed, or finished; anything else (a refusal, a crash) means the kill broke the directory.
      expect(r.signal === 'SIGKILL' || r.code === 0, `${history.join('; ')}\n${r.stderr}`).toBe(true);
      if (r.code === 0) break;
    }
    // The first run cannot reach iteration 6 without writing checkpoint 2 first, so one kill at least always lands.
    expect(history[0]).toBe('run from 0: SIGKILL');
    if ((listCheckpoints(dir)[0] ?? 0) < N || existsSync(join(dir, 'lock'))) {
      const last = await cliOk(['resume', dir, '--workers', '1', '--quiet']);
      expect(last.stdout).toContain('target reached');
    }
    expect(await outcome(dir), history.join('; ')).toEqual(reference);
    expect(tempFiles(dir)).toEqual([]);
    expect(existsSync(join(dir, 'lock'))).toBe(false);
  }, SLOW);
});

describe('the leftovers of a kill', () => {
  it('a half-written checkpoint, logs ahead with torn lines, stray temp files and a dead lock: resume still ends identical', async () => {
    const dir = join(root, 'aftermath');
    cpSync(referenceDir, dir, { recursive: true });
    // Killed while writing checkpoint 6: iteration 6 is in both logs already, its checkpoint only half in a temp file.
    const six = readFileSync(checkpointPath(dir, N));
    rmSync(checkpointPath(dir, N));
    writeFileSync(`${join(dir, 'checkpoints', '.tmp-')}${checkpointPath(dir, N).split('/').pop()}-4242`, six.subarray(0, six.length >> 1));
    // ... and, as after a kill in the middle of an append, a torn last line in each log.
    appendFileSync(join(dir, 'metrics.jsonl'), '{"iteration":7,"activePai');
    appendFileSync(join(dir, 'events.jsonl'), '{"type":"cand');
    // ... and a log rewrite cut short, and the dead process's lock.
    writeFileSync(join(dir, '.tmp-metrics.jsonl-4242'), '{"iteration":1');
    const dead = deadPid();
    writeFileSync(join(dir, 'lock'), `${dead}\n`);

    const r = await cli(['resume', dir, '--workers', '0']);
    expect(r.code, r.stderr).toBe(0);
    expect(r.stderr).toContain(`took over a stale lock left by process ${dead}`);
    expect(r.stderr).toContain(`at iteration ${N - 1}`);
    expect(await outcome(dir)).toEqual(reference);
    expect(tempFiles(dir)).toEqual([]);
    expect(existsSync(join(dir, 'lock'))).toBe(false);
  }, SLOW);
});
