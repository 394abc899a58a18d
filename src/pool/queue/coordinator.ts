import { randomUUID } from 'node:crypto';
import { Queue, QueueEvents } from 'bullmq';
import { Redis } from 'ioredis';
import { writerVersions } from '../../core/index.js';
import type { RolloutResult } from '../../sim/index.js';
import type { BackendStatus, BatchRef, JobItem, RunningJob, Transport } from '../transport.js';
import { QUEUE_TIMING, QueueKeys } from './names.js';
import { JOB_FORMAT, type JobData, type JobReturn } from './payload.js';
import { redisOptions, type RedisAddress } from './url.js';

/** How long closing waits for Redis before it lets go of the connections, ms. */
const CLOSE_WAIT_MS = 2000;

/** Waits for `p` to settle, at most `ms`; never rejects. */
export async function settleWithin(p: Promise<unknown>, ms: number): Promise<void> {
  let timer: NodeJS.Timeout | undefined;
  await Promise.race([p.catch(() => undefined), new Promise((r) => { timer = setTimeout(r, ms); })]);
  clearTimeout(timer);
}

/** An error that ends the batch at once instead of re-running its tasks (Redis gone too long). */
export class FatalTransportError extends Error {
  readonly fatal = true;
}

export interface QueueTransportOptions {
  readonly address: RedisAddress;
  /** Queue name shared with the workers (default "cairn"). */
  readonly queue: string;
  /** How long Redis may stay unreachable before the batch fails, s. */
  readonly redisTimeoutS: number;
  /** Tasks per job, fixed (benchmarks); by default about four jobs per connected worker thread. */
  readonly jobSize?: number;
}

interface Outstanding {
  readonly data: JobData;
  readonly resolve: (r: RolloutResult[]) => void;
  readonly reject: (e: Error) => void;
}

/**
 * Publishes jobs on a BullMQ queue for `cairn worker` processes anywhere, and takes their
 * results from the queue's completion events. A batch's tables are written once to a Redis key;
 * jobs carry indices, seeds and weights only. Every job has an id that names this process's
 * session, so results and jobs of an earlier process (a resumed run) are told apart and ignored.
 * When Redis comes back after an outage, every job still outstanding is published again (its
 * id makes that a no-op where Redis kept it); results are kept by task index, so a job run twice
 * changes nothing.
 */
export class QueueTransport implements Transport {
  readonly name = 'queue workers';
  private readonly keys: QueueKeys;
  private readonly session = randomUUID();
  private readonly versions = writerVersions();
  private readonly control: Redis;
  private readonly queue: Queue;
  private readonly events: QueueEvents;
  private readonly outstanding = new Map<string, Outstanding>();
  /** The current batch's tables: its id, JSON, and whether Redis holds them (since the last reconnect). */
  private tables: { batch: number; json: string; written: boolean } | null = null;
  private toAdd: { id: string; data: JobData }[] = [];
  private jobCounter = 0;
  private threads = 0;
  private workers = 0;
  /** When Redis was last found unreachable (null while connected); unreachable until first connected. */
  private downSince: number | null = performance.now();
  private ready: Promise<void>;
  private readonly timers: NodeJS.Timeout[] = [];
  private closed = false;

  constructor(private readonly o: QueueTransportOptions) {
    this.keys = new QueueKeys(o.queue);
    const conn = redisOptions(o.address);
    this.control = new Redis({ ...conn, lazyConnect: false });
    this.control.on('error', () => undefined); // reported through status(); ioredis retries by itself
    this.control.on('close', () => { this.downSince ??= performance.now(); });
    this.control.on('ready', () => this.onReady());
    this.queue = new Queue(o.queue, { connection: conn, prefix: this.keys.prefix });
    this.queue.on('error', () => undefined);
    this.events = new QueueEvents(o.queue, { connection: conn, prefix: this.keys.prefix });
    this.events.on('error', () => undefined);
    this.events.on('completed', ({ jobId, returnvalue }) => this.onCompleted(jobId, returnvalue as unknown));
    this.events.on('failed', ({ jobId, failedReason }) => this.onFailed(jobId, failedReason));
    this.ready = this.events.waitUntilReady().then(() => this.heartbeat());
    this.timers.push(setInterval(() => void this.heartbeat(), QUEUE_TIMING.heartbeatMs).unref());
    this.timers.push(setInterval(() => this.checkDown(), 1000).unref());
  }

  /** Waits until the queue's event stream is read, so no completion is missed; fails after `timeoutS`. */
  async connect(timeoutS: number): Promise<void> {
    let timer: NodeJS.Timeout | undefined;
    const limit = new Promise<never>((_, reject) => {
      timer = setTimeout(() => reject(new Error(`could not reach Redis at ${this.o.address.display} within ${timeoutS} s`)), timeoutS * 1000);
    });
    try {
      await Promise.race([this.ready, limit]);
    } finally {
      clearTimeout(timer);
    }
  }

  capacity(): number {
    return Infinity;
  }

  jobSize(n: number): number {
    if (this.o.jobSize !== undefined) return this.o.jobSize;
    // About four jobs per connected worker thread, so a slow worker holds up little at the end.
    return Math.min(16, Math.max(1, Math.ceil(n / (4 * Math.max(this.threads, 2)))));
  }

  run(batch: BatchRef, items: readonly JobItem[]): RunningJob {
    const id = `${this.session}:${batch.id}:${this.jobCounter++}`;
    const data: JobData = { format: JOB_FORMAT, versions: this.versions, session: this.session, batch: batch.id, tables: this.keys.tables(this.session, batch.id), items };
    const result = new Promise<RolloutResult[]>((resolve, reject) => this.outstanding.set(id, { data, resolve, reject }));
    if (this.tables?.batch !== batch.id) this.tables = { batch: batch.id, json: JSON.stringify(batch.tables), written: false };
    this.enqueue(id, data);
    return { result, abandon: () => { this.outstanding.delete(id); } };
  }

  /** Jobs started in one turn of the event loop go out in one round trip. */
  private enqueue(id: string, data: JobData): void {
    this.toAdd.push({ id, data });
    if (this.toAdd.length === 1) queueMicrotask(() => void this.flush());
  }

  private async flush(): Promise<void> {
    const jobs = this.toAdd;
    this.toAdd = [];
    try {
      await this.ready;
      await this.writeTables();
      await this.queue.addBulk(jobs.map((j) => ({ name: 'rollouts', data: j.data, opts: { jobId: j.id, removeOnComplete: true, removeOnFail: true } })));
    } catch {
      // Redis went away mid-write: onReady publishes every outstanding job again.
    }
  }

  private async writeTables(): Promise<void> {
    const t = this.tables;
    if (!t || t.written) return;
    await this.control.set(this.keys.tables(this.session, t.batch), t.json, 'EX', QUEUE_TIMING.tablesTtlS);
    t.written = true;
  }

  private onReady(): void {
    if (this.downSince === null) return;
    this.downSince = null;
    if (this.tables) this.tables.written = false;
    // Redis may have lost everything (a restart without persistence): publish what is still owed.
    for (const [id, o] of this.outstanding) this.enqueue(id, o.data);
    void this.heartbeat();
  }

  private checkDown(): void {
    if (this.downSince === null || this.outstanding.size === 0) return;
    if (performance.now() - this.downSince > this.o.redisTimeoutS * 1000) {
      const e = new FatalTransportError(`Redis at ${this.o.address.display} unreachable for more than ${this.o.redisTimeoutS} s`);
      for (const o of this.outstanding.values()) o.reject(e);
      this.outstanding.clear();
    }
  }

  private onCompleted(jobId: string, value: unknown): void {
    const o = this.outstanding.get(jobId);
    if (!o) return; // another session's job, or one already settled
    const r = (typeof value === 'string' ? JSON.parse(value) : value) as JobReturn | null;
    this.outstanding.delete(jobId);
    if (r && 'results' in r && Array.isArray(r.results) && r.results.length === o.data.items.length) o.resolve([...r.results]);
    else o.reject(new Error('a worker returned no results for the job'));
  }

  private onFailed(jobId: string, reason: string): void {
    const o = this.outstanding.get(jobId);
    if (!o) return;
    this.outstanding.delete(jobId);
    o.reject(new Error(`queue worker: ${reason}`));
  }

  /** Keeps this session's key alive and counts the workers whose heartbeats are present. */
  private async heartbeat(): Promise<void> {
    if (this.closed) return;
    try {
      await this.control.set(this.keys.session(this.session), '1', 'PX', QUEUE_TIMING.heartbeatTtlMs);
      let workers = 0;
      let threads = 0;
      let cursor = '0';
      do {
        const [next, keys] = await this.control.scan(cursor, 'MATCH', this.keys.workerPattern(), 'COUNT', 1000);
        cursor = next;
        const values = keys.length > 0 ? await this.control.mget(keys) : [];
        for (const v of values) {
          if (!v) continue;
          workers++;
          threads += Number((JSON.parse(v) as { threads?: number }).threads) || 0;
        }
      } while (cursor !== '0');
      this.workers = workers;
      this.threads = threads;
    } catch {
      // Unreachable: status() says so.
    }
  }

  status(): BackendStatus {
    if (this.downSince !== null) {
      const s = Math.round((performance.now() - this.downSince) / 1000);
      return { workers: this.workers, threads: this.threads, waiting: `Redis at ${this.o.address.display} unreachable for ${s} s; waiting (gives up after ${this.o.redisTimeoutS} s)` };
    }
    if (this.workers === 0) return { workers: 0, threads: 0, waiting: `no worker connected to queue "${this.o.queue}" at ${this.o.address.display}` };
    return { workers: this.workers, threads: this.threads };
  }

  async close(): Promise<void> {
    if (this.closed) return;
    this.closed = true;
    for (const t of this.timers) clearInterval(t);
    for (const o of this.outstanding.values()) o.reject(new Error('queue transport closed'));
    this.outstanding.clear();
    // Jobs still waiting are another process's to ignore: the session key lapses, workers skip them.
    // Nothing here may wait for a Redis that is gone: a run stopping because of it must still exit.
    await settleWithin(this.control.del(this.keys.session(this.session)), CLOSE_WAIT_MS);
    await settleWithin(Promise.allSettled([this.events.close(), this.queue.close()]), CLOSE_WAIT_MS);
    this.control.disconnect();
  }
}
