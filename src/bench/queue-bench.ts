import { spawn, type ChildProcess } from 'node:child_process';
import { fileURLToPath } from 'node:url';
import { Redis } from 'ioredis';
import { median } from '../core/index.js';
import { makeEvaluator, QueueTransport, parseRedisUrl, redisOptions, ScheduledEvaluator, threads, type Batch, type RedisAddress } from '../pool/index.js';
import { benchBatch, timeInTurns } from './pool-bench.js';
import type { BenchScene } from './fixture.js';

/** The command line, to start `cairn worker` processes beside this one, and the bench's echo consumer. */
const CLI = fileURLToPath(new URL('../cli/main.js', import.meta.url));
const ECHO = fileURLToPath(new URL('./echo-worker.js', import.meta.url));

/** `cairn worker` processes on a queue (or, with `echo`, consumers that run nothing), started for a benchmark and stopped after it. */
async function startWorkers(url: string, queue: string, processes: number, threadsEach: number, echo = false): Promise<ChildProcess[]> {
  const args = echo ? [ECHO, url, queue, String(4 * threadsEach)] : [CLI, 'worker', '--queue', url, '--queue-name', queue, '--threads', String(threadsEach)];
  const kids = Array.from({ length: processes }, () => spawn(process.execPath, args, { stdio: ['ignore', 'ignore', 'pipe'] }));
  await Promise.all(kids.map((k) => new Promise<void>((resolve, reject) => {
    let err = '';
    k.stderr!.setEncoding('utf8').on('data', (s: string) => {
      err += s;
      if (/ on queue /.test(err)) resolve();
    });
    k.once('exit', (code) => reject(new Error(`${echo ? 'echo consumer' : 'cairn worker'} exited with ${code}: ${err}`)));
  })));
  return kids;
}

async function stopWorkers(kids: readonly ChildProcess[]): Promise<void> {
  await Promise.all(kids.map((k) => new Promise<void>((resolve) => {
    if (k.exitCode !== null) return resolve();
    k.once('exit', () => resolve());
    k.kill('SIGTERM');
  })));
}

/** CPU time redis-server has used since it started, ms (`INFO cpu`: used_cpu_user + used_cpu_sys, in seconds). */
export async function redisCpuMsOf(client: Redis): Promise<number> {
  const info = await client.info('cpu');
  const field = (name: string): number => {
    const m = new RegExp(`^${name}:([0-9.]+)`, 'm').exec(info);
    if (!m) throw new Error(`Redis INFO cpu has no ${name}`);
    return Number(m[1]) * 1000;
  };
  return field('used_cpu_user') + field('used_cpu_sys');
}

export interface QueueBench {
  /** Cores given to rollouts on each side: threads of this process, or one worker process with that many threads. */
  readonly cores: number;
  readonly tasks: number;
  readonly steps: number;
  /** Median batch times, ms. */
  readonly threadsMs: number;
  readonly queueMs: number;
  /** Queue throughput over worker-thread throughput at equal cores (target ≥ 0.9). */
  readonly ratio: number;
  /** Jobs of one one-step rollout each turned around per second with the workers on this machine's cores too (wall clock, median round). */
  readonly trivialJobsPerSecond: number;
  /** CPU time per trivial job of the coordinator process and of redis-server (Redis's own INFO cpu), ms. */
  readonly coordinatorMsPerJob: number;
  readonly redisMsPerJob: number;
  /**
   * Jobs per second one coordinator and Redis sustain with a core each and the workers elsewhere:
   * 1,000 / the larger of the two CPU times per job (target ≥ 2,000). Derived from measured CPU
   * time, not a wall-clock rate; both are single-threaded, so neither can go faster than this.
   */
  readonly capacityJobsPerSecond: number;
  /** The same jobs answered by consumers that run nothing (src/bench/echo-worker.ts): the coordinator and Redis on the wall clock. */
  readonly echoJobsPerSecond: number;
  readonly trivialJobs: number;
  /** Mean rollout time and job size of the batch above, used for the projection. */
  readonly rolloutMs: number;
  readonly jobSize: number;
  /** What the coordinator's and Redis's capacity would allow at larger core counts: a projection, not a measurement. */
  readonly projection: readonly { readonly cores: number; readonly jobsPerSecondNeeded: number; readonly coordinatorShare: number; readonly projectedSpeedup: number }[];
}

/**
 * The queue backend against worker threads at equal core counts, on a batch of `tasks` rollouts
 * of `steps` steps (the demo's batches are 70–150 rollouts), and the job rate of one coordinator
 * and Redis with trivial jobs, projected to 16, 256 and 1,024 cores.
 */
export async function benchQueue(scene: BenchScene, url: string, cores: number, tasks: number, steps: number, rounds: number, trivialJobs: number): Promise<QueueBench> {
  const queue = `bench-${process.pid}`;
  const batch = benchBatch(scene, tasks, steps);
  const address = parseRedisUrl(url);
  let kids = await startWorkers(url, queue, 1, cores);
  const local = makeEvaluator(threads(cores));
  const transport = new QueueTransport({ address, queue, redisTimeoutS: 60 });
  const remote = new ScheduledEvaluator(transport, { taskTimeoutMs: Infinity });
  let threadsMs: number;
  let queueMs: number;
  try {
    await transport.connect(30);
    [threadsMs, queueMs] = await timeInTurns(batch, [local, remote], 2, rounds);
  } finally {
    await Promise.all([local.close(), remote.close()]);
    await stopWorkers(kids);
  }
  // Trivial jobs: one one-step rollout each on the two-segment flat course, so the coordinator,
  // Redis and BullMQ are the cost. The worker processes share this machine's cores; the CPU time
  // the coordinator and Redis spend per job says what they sustain with the workers elsewhere.
  const trivialBatch = { ...benchBatch(scene, trivialJobs, 1), courses: [scene.flat] };
  const trivialRounds = Math.max(3, Math.ceil(rounds / 2));
  kids = await startWorkers(url, queue, Math.max(2, cores), 2);
  const workersRate = await timeJobs(address, queue, trivialBatch, trivialRounds).finally(() => stopWorkers(kids));
  // The same jobs answered by consumers that run nothing: the coordinator and Redis on the wall clock.
  kids = await startWorkers(url, queue, Math.max(2, cores), 2, true);
  const echoRate = await timeJobs(address, queue, trivialBatch, trivialRounds).finally(() => stopWorkers(kids));
  const trivialJobsPerSecond = workersRate.jobsPerSecond;
  const { coordinatorMsPerJob, redisMsPerJob } = workersRate;
  const capacityJobsPerSecond = 1000 / Math.max(coordinatorMsPerJob, redisMsPerJob);
  const echoJobsPerSecond = echoRate.jobsPerSecond;
  const rolloutMs = (threadsMs * cores) / tasks;
  const jobSize = Math.min(16, Math.max(1, Math.ceil(tasks / (4 * cores))));
  const ratio = threadsMs / queueMs;
  const projection = [16, 256, 1024].map((c) => {
    // Each core finishes a job every jobSize·rolloutMs; the coordinator and Redis turn around capacityJobsPerSecond at most.
    const jobsPerSecondNeeded = c / ((jobSize * rolloutMs) / 1000);
    const coordinatorShare = Math.min(1, capacityJobsPerSecond / jobsPerSecondNeeded);
    return { cores: c, jobsPerSecondNeeded, coordinatorShare, projectedSpeedup: c * coordinatorShare * Math.min(1, ratio) };
  });
  return { cores, tasks, steps, threadsMs, queueMs, ratio, trivialJobsPerSecond, coordinatorMsPerJob, redisMsPerJob, capacityJobsPerSecond, echoJobsPerSecond, trivialJobs, rolloutMs, jobSize, projection };
}

interface JobRate { readonly jobsPerSecond: number; readonly coordinatorMsPerJob: number; readonly redisMsPerJob: number }

/**
 * Jobs of one task each turned around per second (median round, wall clock) by whatever consumes
 * the queue, after one warm-up round; and the CPU time per job of this process and of Redis.
 */
async function timeJobs(address: RedisAddress, queue: string, batch: Batch, rounds: number): Promise<JobRate> {
  const transport = new QueueTransport({ address, queue, redisTimeoutS: 60, jobSize: 1 });
  const evaluator = new ScheduledEvaluator(transport, { taskTimeoutMs: Infinity });
  const probe = new Redis(redisOptions(address));
  probe.on('error', () => undefined);
  const walls: number[] = [];
  let coordinatorCpuMs = 0;
  let redisCpuMs = 0;
  try {
    await transport.connect(30);
    await evaluator.evaluate(batch);
    for (let r = 0; r < rounds; r++) {
      const cpu0 = process.cpuUsage();
      const redis0 = await redisCpuMsOf(probe);
      const t0 = performance.now();
      await evaluator.evaluate(batch);
      walls.push(performance.now() - t0);
      const cpu = process.cpuUsage(cpu0);
      coordinatorCpuMs += (cpu.user + cpu.system) / 1000;
      redisCpuMs += (await redisCpuMsOf(probe)) - redis0;
    }
  } finally {
    probe.disconnect();
    await evaluator.close();
  }
  const jobs = rounds * batch.tasks.length;
  return { jobsPerSecond: batch.tasks.length / (median(walls) / 1000), coordinatorMsPerJob: coordinatorCpuMs / jobs, redisMsPerJob: redisCpuMs / jobs };
}
