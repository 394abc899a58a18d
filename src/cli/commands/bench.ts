import { dirname, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import type { Command } from 'commander';
import { benchPool, benchRollouts, benchScaling, benchScene } from '../../bench/index.js';
import { InvalidArgumentError } from 'commander';
import { Progress } from '../progress.js';

interface BenchOptions { json?: boolean; quick?: boolean; scaling?: number[]; quiet?: boolean }

function counts(v: string): number[] {
  const list = v.split(',').map((p) => Number(p.trim()));
  if (list.length === 0 || list.some((n) => !Number.isInteger(n) || n < 1 || n > 1024)) throw new InvalidArgumentError(`expected worker counts like 1,2,4,8, found "${v}"`);
  return list;
}

const fmt = (x: number, d = 0): string => x.toLocaleString('en-US', { maximumFractionDigits: d, minimumFractionDigits: d });

async function benchAction(o: BenchOptions): Promise<void> {
  const root = resolve(dirname(fileURLToPath(import.meta.url)), '../../..');
  const progress = new Progress(o.quiet === true || o.json === true, 0);
  const scene = benchScene(root);
  const rounds = o.quick ? 3 : 9;
  const steps = o.quick ? 300 : 1000;
  progress.update('single-thread rollouts...', true);
  const r = benchRollouts(scene, rounds, steps);
  progress.update('worker pool, 64 rollouts on 0, 1 and 2 workers...', true);
  const p = await benchPool(scene, o.quick ? 2 : 5, o.quick ? 200 : 500);
  let scaling;
  if (o.scaling) {
    progress.update(`scaling over ${o.scaling.join(', ')} workers...`, true);
    scaling = await benchScaling(scene, o.scaling, 256, 500, o.quick ? 2 : 3);
  }
  progress.done();
  const report = { ...r, ...p, ...(scaling ? { scaling } : {}), node: process.version, cores: (await import('node:os')).availableParallelism() };
  if (o.json) {
    process.stdout.write(`${JSON.stringify(report)}\n`);
    return;
  }
  const rows: [string, string, string][] = [
    ['course', `${r.courseSegments} ground segments`, ''],
    ['raw physics (scripted motors)', `${fmt(r.rawStepsPerSec)} steps/s`, ''],
    ['same + sensors and policy', `${fmt(r.fullStepsPerSec)} steps/s`, ''],
    ['full over raw time (rolloutOverRaw)', fmt(r.rolloutOverRaw, 3), 'target ≤ 1.2'],
    ['closed loop', `${fmt(r.closedLoopStepsPerSec)} steps/s`, ''],
    ['world build', `${fmt(r.buildMs, 3)} ms (${fmt(100 * r.buildShare, 2)}% of a 1,500-step rollout)`, 'target < 2%'],
    ['heap growth', `${fmt(r.heapGrowthPer100KiB, 1)} KiB per 100 rollouts`, 'target ≈ 0'],
    ['64 rollouts: in thread / 1 / 2 workers', `${fmt(p.batchMs.inline)} / ${fmt(p.batchMs.workers1)} / ${fmt(p.batchMs.workers2)} ms`, ''],
    ['speedup with 2 workers (speedup2)', fmt(p.speedup2, 2), 'target ≥ 1.8'],
    ['per-task overhead', `${fmt(p.perTaskOverheadMs, 3)} ms`, ''],
  ];
  for (const s of scaling ?? []) rows.push([`${s.workers} workers, 256 rollouts`, `${fmt(s.ms)} ms  speed-up ${fmt(s.speedup, 2)}  efficiency ${fmt(100 * s.efficiency)}%`, '']);
  const w = Math.max(...rows.map((x) => x[0].length));
  for (const [a, b, c] of rows) process.stdout.write(`${a.padEnd(w)}  ${b}${c ? `  (${c})` : ''}\n`);
}

export function registerBench(program: Command): void {
  program
    .command('bench')
    .description('measure rollout speed, sensing overhead, world build, heap growth and worker-pool speed-up')
    .option('--json', 'print one JSON object')
    .option('--quick', 'fewer and shorter runs (rough figures)')
    .option('--scaling <counts>', 'also time a 256-rollout batch for each worker count, e.g. 1,2,4,8,16', counts)
    .option('--quiet', 'no progress on stderr')
    .action(benchAction);
}
