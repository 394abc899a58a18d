/**
 * `cairn worker` against jobs it must not run: malformed data, a job from another cairn /
 * planck-js / Node version, and batch tables that are not what they claim. Each fails with a
 * message saying why, and the worker goes on to serve a real run. Real Redis, real BullMQ.
 */
import { execSync } from 'node:child_process';
import { readFileSync, rmSync } from 'node:fs';
import { join } from 'node:path';
import { Queue, QueueEvents } from 'bullmq';
import { Redis } from 'ioredis';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { writerVersions } from '../../src/core/index.js';
import { startRedis, type RedisServer } from '../../src/bench/redis-server.js';
import { redisCpuMsOf } from '../../src/bench/queue-bench.js';
import { cliOk, ensureBuilt, SLOW, startCli, status, tempDir, waitFor, writeTinyRecipe, type Started } from '../store/helpers.js';

let root = '';
let redis: RedisServer;
let worker: Started;
let queue: Queue;
let events: QueueEvents;
let control: Redis;

const connection = (): { host: string; port: number; maxRetriesPerRequest: null } => ({ host: '127.0.0.1', port: redis.port, maxRetriesPerRequest: null });

beforeAll(async () => {
  ensureBuilt();
  root = tempDir('payload');
  redis = await startRedis();
  worker = startCli(['worker', '--queue', redis.url, '--threads', '1']);
  await waitFor('the worker to start', () => / on queue "cairn"/.test(worker.out().stderr), 60_000);
  queue = new Queue('cairn', { connection: connection(), prefix: 'cairn' });
  events = new QueueEvents('cairn', { connection: connection(), prefix: 'cairn' });
  await events.waitUntilReady();
  control = new Redis(connection());
}, SLOW);

afterAll(async () => {
  await Promise.allSettled([queue?.close(), events?.close()]);
  control?.disconnect();
  worker?.child.kill('SIGTERM');
  await worker?.done;
  await redis?.stop();
  rmSync(root, { recursive: true, force: true });
}, SLOW);

/** Adds one job and returns the reason it failed with (or 'completed'). */
async function outcomeOf(data: unknown, id: string): Promise<string> {
  const settled = new Promise<string>((resolve) => {
    events.on('failed', ({ jobId, failedReason }) => { if (jobId === id) resolve(failedReason); });
    events.on('completed', ({ jobId }) => { if (jobId === id) resolve('completed'); });
  });
  await queue.add('rollouts', data, { jobId: id, removeOnComplete: true, removeOnFail: true });
  return settled;
}

const task = { kind: 'rollout', course: 0, plan: 0, shape: 0, options: 0, policy: { kind: 'params', params: [0, 1] } };
const job = (over: Record<string, unknown>): Record<string, unknown> => ({
  format: 1, versions: writerVersions(), session: 'forged-session', batch: 0, tables: 'cairn:cairn:x:tables:forged-session:0', items: [{ index: 0, attempt: 0, task }], ...over,
});

describe('cairn worker refuses', () => {
  it('a job whose data is not a cairn job, naming the field', async () => {
    expect(await outcomeOf({ hello: 'world' }, 'forged-1')).toMatch(/^refused a malformed job: /);
    expect(await outcomeOf(job({ items: [{ index: -1, attempt: 0, task }] }), 'forged-2')).toMatch(/refused a malformed job: items\[0\]\.index/);
  }, SLOW);

  it('a job from another cairn, planck-js or Node version, because its results would differ', async () => {
    const other = { ...writerVersions(), planck: '9.9.9' };
    const reason = await outcomeOf(job({ versions: other }), 'forged-3');
    expect(reason).toMatch(/refused a job from another version \(planck-js \d+\.\d+\.\d+ here, 9\.9\.9 there\): its results would differ/);
  }, SLOW);

  it('batch tables that are missing, not JSON, or malformed', async () => {
    await control.set('cairn:cairn:x:session:forged-session', '1', 'EX', 60);
    expect(await outcomeOf(job({}), 'forged-4')).toMatch(/tables .* are not in Redis/);
    await control.set('cairn:cairn:x:tables:forged-session:0', '{not json', 'EX', 60);
    expect(await outcomeOf(job({}), 'forged-5')).toMatch(/not JSON/);
    await control.set('cairn:cairn:x:tables:forged-session:0', JSON.stringify({ courses: [], plans: [{}], shapes: [], options: [], bases: [] }), 'EX', 60);
    expect(await outcomeOf(job({ tables: 'cairn:cairn:x:tables:forged-session:0', batch: 0 }), 'forged-6')).toMatch(/refused malformed batch tables/);
  }, SLOW);

  it('and still serves a real run afterwards, to the local fingerprint', async () => {
    const recipe = writeTinyRecipe(root);
    await cliOk(['run', recipe, '--out', join(root, 'local'), '--workers', '0', '--quiet']);
    await cliOk(['run', recipe, '--out', join(root, 'queued'), '--queue', redis.url, '--quiet']);
    expect((await status(join(root, 'queued'))).fingerprint).toBe((await status(join(root, 'local'))).fingerprint);
    expect(worker.child.exitCode).toBeNull();
    expect(worker.out().stderr).toMatch(/job forged-3 failed: refused a job from another version/);
  }, SLOW);
});

describe('the queue benchmark\'s Redis CPU probe', () => {
  it('agrees with the kernel\'s account of the redis-server process', async () => {
    // Outside reference: proc(5), /proc/<pid>/stat fields 14 and 15 (utime, stime) in clock
    // ticks of sysconf(_SC_CLK_TCK), here read with getconf(1).
    const tick = 1000 / Number(execSync('getconf CLK_TCK').toString().trim());
    const kernelMs = (): number => {
      const fields = readFileSync(`/proc/${redis.process.pid}/stat`, 'utf8').split(') ')[1].split(' ');
      return (Number(fields[11]) + Number(fields[12])) * tick;
    };
    const work = Array.from({ length: 20_000 }, (_, i) => ['set', `probe:${i}`, 'x'.repeat(200)]);
    await control.pipeline(work).exec();
    const [before, viaInfo, after] = [kernelMs(), await redisCpuMsOf(control), kernelMs()];
    expect(before).toBeGreaterThan(0);
    // INFO cpu has microsecond resolution, /proc whole ticks: equal to within two ticks.
    expect(viaInfo).toBeGreaterThanOrEqual(before - 2 * tick);
    expect(viaInfo).toBeLessThanOrEqual(after + 2 * tick);
  }, SLOW);
});
