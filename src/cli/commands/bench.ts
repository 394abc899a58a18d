import type { Command } from 'commander';
import { plural } from '../../core/index.js';
import { benchCheckpoint, benchLearning, benchPool, benchQueue, benchRollouts, benchScaling, benchScene, benchSoak, startRedis, type QueueBench } from '../../bench/index.js';
import { defaultWorkerCount, makeEvaluator, threads } from '../../pool/index.js';
import { intIn } from '../options.js';
import { InvalidArgumentError } from 'commander';
import { Progress } from '../progress.js';
import { PACKAGE_ROOT } from '../shipped.js';

interface BenchOptions { json?: boolean; quick?: boolean; scaling?: number[]; quiet?: boolean; learn?: number; checkpoint?: string; soak?: number; workers: number; queue?: string | true; queueCores?: number }

function counts(v: string): number[] {
  const list = v.split(',').map((p) => Number(p.trim()));
  if (list.length === 0 || list.some((n) => !Number.isInteger(n) || n < 1 || n > 1024)) throw new InvalidArgumentError(`expected worker counts like 1,2,4,8, found "${v}"`);
  return list;
}

const fmt = (x: number, d = 0): string => x.toLocaleString('en-US', { maximumFractionDigits: d, minimumFractionDigits: d });

async function benchAction(o: BenchOptions): Promise<void> {
  const root = PACKAGE_ROOT;
  const progress = new Progress(o.quiet === true || o.json === true, 0);
  const scene = benchScene(root);
  const rounds = o.quick ? 3 : 15;
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
  const extra = await extras(o, root, progress);
  let queue: QueueBench | undefined;
  if (o.queue) {
    progress.update('queue backend against worker threads, and one coordinator\'s job rate...', true);
    queue = await withRedis(o.queue, (url) => benchQueue(scene, url, o.queueCores ?? defaultWorkerCount(), 150, o.quick ? 300 : 1000, o.quick ? 2 : 5, o.quick ? 1000 : 4000));
  }
  progress.done();
  const report = { ...r, ...p, ...(scaling ? { scaling } : {}), ...(queue ? { queue } : {}), ...extra.json, node: process.version, cores: (await import('node:os')).availableParallelism() };
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
  rows.push(...extra.rows);
  if (queue) rows.push(...queueRows(queue));
  const w = Math.max(...rows.map((x) => x[0].length));
  for (const [a, b, c] of rows) process.stdout.write(`${a.padEnd(w)}  ${b}${c ? `  (${c})` : ''}\n`);
}

type Row = [string, string, string];

/** Runs `body` against the given Redis URL, or against a throwaway redis-server when none is given. */
async function withRedis<T>(url: string | true, body: (url: string) => Promise<T>): Promise<T> {
  if (url !== true) return body(url);
  const server = await startRedis();
  try {
    return await body(server.url);
  } finally {
    await server.stop();
  }
}

function queueRows(q: QueueBench): Row[] {
  const rows: Row[] = [
    [`${q.tasks} rollouts of ${q.steps} steps on ${q.cores} cores: threads / queue`, `${fmt(q.threadsMs)} / ${fmt(q.queueMs)} ms; queue over threads ${fmt(q.ratio, 2)}`, 'target ≥ 0.9'],
    [`coordinator + Redis, ${q.trivialJobs} one-step jobs, workers on the same cores`, `${fmt(q.trivialJobsPerSecond)} jobs/s (wall clock)`, ''],
    ['CPU time per job: coordinator / Redis', `${fmt(q.coordinatorMsPerJob, 3)} / ${fmt(q.redisMsPerJob, 3)} ms`, ''],
    ['coordinator + Redis with a core each, workers elsewhere', `${fmt(q.capacityJobsPerSecond)} jobs/s (1,000 / the larger CPU time per job)`, 'target ≥ 2,000'],
    ['the same jobs answered by consumers that run nothing', `${fmt(q.echoJobsPerSecond)} jobs/s (wall clock)`, 'target ≥ 2,000'],
  ];
  for (const p of q.projection) {
    rows.push([`projection, ${p.cores} cores`, `needs ${fmt(p.jobsPerSecondNeeded)} jobs/s at ${q.jobSize} rollouts/job of ${fmt(q.rolloutMs, 1)} ms; the coordinator and Redis can feed ${fmt(100 * p.coordinatorShare)}% of them; speed-up ≈ ${fmt(p.projectedSpeedup)}`, 'projection']);
  }
  return rows;
}

/** The optional sections: learning to walk, checkpoint cost, memory over a long run. */
async function extras(o: BenchOptions, root: string, progress: Progress): Promise<{ json: Record<string, unknown>; rows: Row[] }> {
  const json: Record<string, unknown> = {};
  const rows: Row[] = [];
  if (!o.learn && !o.checkpoint && !o.soak) return { json, rows };
  const evaluator = makeEvaluator(threads(o.workers));
  try {
    if (o.learn) {
      progress.update(`learning to walk, ${plural(o.learn, 'seed')}...`, true);
      const l = await benchLearning(root, Array.from({ length: o.learn }, (_, i) => i + 1), 0.9, 200, evaluator);
      json.learning = l;
      rows.push(['learn to walk (progress 0.9), iterations', `median ${l.medianIterations}, worst ${l.worstIterations} (${l.runs.map((x) => x.iterations).join(', ')})`, '']);
      rows.push(['learn to walk, wall time', `median ${fmt(l.medianSeconds, 1)} s, worst ${fmt(l.worstSeconds, 1)} s`, 'target 60 s / 180 s']);
    }
    if (o.checkpoint) {
      progress.update(`checkpoint cost on ${o.checkpoint}...`, true);
      const c = await benchCheckpoint(o.checkpoint, evaluator, 3);
      json.checkpoint = c;
      rows.push(['checkpoint write', `${fmt(c.writeMs, 1)} ms for ${fmt(c.checkpointBytes / 1024)} KiB; iteration ${fmt(c.iterationMs)} ms; share ${fmt(100 * c.share, 2)}%`, 'target < 2%']);
    }
    if (o.soak) {
      progress.update(`memory over ${plural(o.soak, 'iteration')} of runs/smoke.json...`, true);
      const s = await benchSoak(`${root}/runs/smoke.json`, evaluator, o.soak);
      json.soak = { iterations: s.iterations, growthAfterWarmupMiB: s.growthAfterWarmupMiB, rssMiB: s.rssMiB.map((x) => Math.round(x * 10) / 10) };
      const q = (f: number): string => fmt(s.rssMiB[Math.min(s.rssMiB.length - 1, Math.floor(f * s.rssMiB.length))], 1);
      rows.push([`resident memory, ${s.iterations} smoke iterations`, `${q(0.25)} → ${q(0.5)} → ${q(0.75)} → ${q(1)} MiB (growth after warm-up ${fmt(s.growthAfterWarmupMiB, 1)} MiB)`, 'target: flat']);
    }
  } finally {
    await evaluator.close();
  }
  return { json, rows };
}

export function registerBench(program: Command): void {
  program
    .command('bench')
    .description('measure rollout speed, sensing overhead, world build, heap growth and worker-pool speed-up')
    .option('--json', 'print one JSON object')
    .option('--quick', 'fewer and shorter runs (rough figures)')
    .option('--scaling <counts>', 'also time a 256-rollout batch for each worker count, e.g. 1,2,4,8,16', counts)
    .option('--learn <seeds>', 'also train the demo body on flat ground for this many seeds (time to progress 0.9)', intIn(1, 100))
    .option('--checkpoint <run-dir>', 'also time checkpoint writes against iterations of this run')
    .option('--soak <iterations>', 'also track resident memory over this many iterations of runs/smoke.json', intIn(1, 1_000_000))
    .option('--workers <n>', 'worker threads for --learn, --checkpoint and --soak', intIn(0, 1024), defaultWorkerCount())
    .option('--queue [url]', 'also compare the Redis queue backend with worker threads and time one coordinator\'s job rate; without a URL a throwaway redis-server is started')
    .option('--queue-cores <n>', 'cores for the queue comparison (default: all)', intIn(1, 1024))
    .option('--quiet', 'no progress on stderr')
    .action(benchAction);
}
