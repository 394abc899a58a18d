import { hostname } from 'node:os';
import { Worker, type Job } from 'bullmq';
import { Redis } from 'ioredis';
import { writerVersions } from '../../core/index.js';
import type { BatchTables } from '../task.js';
import { ThreadEvaluator } from '../threads.js';
import { settleWithin } from './coordinator.js';
import { QUEUE_TIMING, QueueKeys } from './names.js';
import { assertTaskIndices, parseJobData, parseTables, type JobReturn } from './payload.js';
import { redisOptions, type RedisAddress } from './url.js';

export interface ServeOptions {
  readonly address: RedisAddress;
  readonly queue: string;
  /** Worker threads running rollouts; as many jobs run at once. */
  readonly threads: number;
  /** One line per notable event: start, a refused or failed job, Redis lost and found. */
  readonly log: (line: string) => void;
}

export interface QueueWorker {
  /** Jobs finished and refused so far. */
  readonly counts: { done: number; failed: number; stale: number };
  close(): Promise<void>;
}

/** How long a stopping worker waits for the jobs in hand, ms. */
const CLOSE_JOBS_MS = 30_000;

/** Most batches' tables kept parsed at once (several coordinators may share a queue). */
const TABLES_KEPT = 4;
/** How long a live session is taken as live before its key is looked up again, ms (its key lapses 12 s after its coordinator dies). */
const SESSION_RECHECK_MS = 1000;
const SESSIONS_KEPT = 64;

/**
 * `cairn worker`: takes rollout jobs from the queue and runs them on this process's own threads
 * (never on its main thread, whose event loop must stay free to renew job locks). A batch's
 * tables are read from Redis and validated once per batch; every job is validated before it
 * runs, and a malformed, foreign or other-version job fails with a message while the worker
 * goes on. Jobs of a coordinator session that is gone are skipped without running.
 */
export async function serveQueue(o: ServeOptions): Promise<QueueWorker> {
  const keys = new QueueKeys(o.queue);
  const conn = redisOptions(o.address);
  const control = new Redis(conn);
  let lost = false;
  let connected = false;
  let closing = false;
  let saidUnreachable = false;
  control.on('error', (e: Error & { code?: string }) => {
    // Before the first connection: say once that the worker waits (systemd may start it before Redis).
    if (!connected && !saidUnreachable) o.log(`cannot reach Redis at ${o.address.display} (${e.code ?? e.message}); retrying every 2 s`);
    saidUnreachable = true;
  });
  control.on('close', () => {
    if (connected && !lost && !closing) o.log(`lost Redis at ${o.address.display}; reconnecting`);
    lost = connected;
  });
  control.on('ready', () => {
    if (lost) o.log(`Redis at ${o.address.display} is back`);
    lost = false;
    connected = true;
  });
  const id = `${hostname()}:${process.pid}`;
  const info = JSON.stringify({ host: hostname(), pid: process.pid, threads: o.threads, versions: writerVersions() });
  const beat = (): void => void control.set(keys.worker(id), info, 'PX', QUEUE_TIMING.heartbeatTtlMs).catch(() => undefined);
  beat();
  const timer = setInterval(beat, QUEUE_TIMING.heartbeatMs);

  const free: ThreadEvaluator[] = Array.from({ length: o.threads }, () => new ThreadEvaluator(1));
  const all = [...free];
  const tables = new Map<string, BatchTables>();
  const counts = { done: 0, failed: 0, stale: 0 };

  async function tablesOf(key: string, job: ReturnType<typeof parseJobData>): Promise<BatchTables> {
    const tasks = job.items.map((i) => i.task);
    const cached = tables.get(key);
    if (cached) {
      assertTaskIndices(cached, tasks);
      return cached;
    }
    const json = await control.get(key);
    if (json === null) throw new Error(`the batch's tables (${key}) are not in Redis: expired, or Redis restarted; the coordinator writes them again`);
    let parsed: unknown;
    try {
      parsed = JSON.parse(json);
    } catch {
      throw new Error('refused batch tables that are not JSON');
    }
    const t = parseTables(parsed, tasks);
    tables.set(key, t);
    if (tables.size > TABLES_KEPT) tables.delete(tables.keys().next().value!);
    return t;
  }

  // Whether a session's key was in Redis, and when that was looked up: one round trip per
  // session and second rather than per job. A dead session never comes back, so its answer is
  // kept; a live one is looked up again after SESSION_RECHECK_MS.
  const sessions = new Map<string, { alive: boolean; at: number }>();
  async function sessionAlive(session: string): Promise<boolean> {
    const known = sessions.get(session);
    if (known && (!known.alive || performance.now() - known.at < SESSION_RECHECK_MS)) return known.alive;
    const alive = (await control.exists(keys.session(session))) === 1;
    sessions.set(session, { alive, at: performance.now() });
    if (sessions.size > SESSIONS_KEPT) sessions.delete(sessions.keys().next().value!);
    return alive;
  }

  async function runJob(job: Job): Promise<JobReturn> {
    const data = parseJobData(job.data);
    if (!(await sessionAlive(data.session))) {
      counts.stale++;
      return { stale: true };
    }
    const t = await tablesOf(data.tables, data);
    const ev = free.pop();
    if (!ev) throw new Error('internal: more jobs at once than threads');
    try {
      const results = await ev.evaluate({ ...t, tasks: data.items.map((i) => i.task) });
      counts.done++;
      return { results };
    } finally {
      free.push(ev);
    }
  }

  const worker = new Worker(o.queue, runJob, {
    connection: conn, prefix: keys.prefix, concurrency: o.threads,
    lockDuration: QUEUE_TIMING.lockDurationMs, stalledInterval: QUEUE_TIMING.stalledIntervalMs, maxStalledCount: QUEUE_TIMING.maxStalledCount,
  });
  worker.on('error', () => undefined); // connection trouble: reported through the control connection
  worker.on('failed', (job, err) => {
    counts.failed++;
    o.log(`job ${job?.id ?? '?'} failed: ${err.message}`);
  });
  await worker.waitUntilReady();
  o.log(`worker ${id}: ${o.threads} thread${o.threads === 1 ? '' : 's'} on queue "${o.queue}" at ${o.address.display} (cairn ${writerVersions().cairn}, planck-js ${writerVersions().planck}, Node ${writerVersions().node})`);

  return {
    counts,
    async close() {
      closing = true;
      clearInterval(timer);
      // Jobs in hand finish (a rollout is seconds at most); past that, or with Redis gone, let go:
      // an unfinished job's lock lapses and another worker runs it.
      await settleWithin(worker.close(), CLOSE_JOBS_MS);
      await settleWithin(worker.close(true), 2000);
      await Promise.all(all.map((e) => e.close()));
      await settleWithin(control.del(keys.worker(id)), 2000);
      control.disconnect();
    },
  };
}
