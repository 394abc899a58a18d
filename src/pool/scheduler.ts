import type { RolloutResult } from '../sim/index.js';
import type { Batch, Evaluator, PoolEvent } from './task.js';
import type { BackendStatus, BatchRef, JobItem, RunningJob, Transport } from './transport.js';

export interface SchedulerOptions {
  /** Wall-clock limit of one task, ms; a job of k tasks gets k times this. Default 120 000; Infinity for none. */
  readonly taskTimeoutMs?: number;
  /** Told about every job that failed and was re-queued. */
  readonly onEvent?: (e: PoolEvent) => void;
}

/** Rollouts per second are counted over this window, ms. */
const RATE_WINDOW_MS = 10_000;

interface Job { readonly id: number; readonly items: readonly JobItem[] }

interface Current {
  readonly ref: BatchRef;
  readonly queue: Job[];
  readonly results: RolloutResult[];
  remaining: number;
  inFlight: number;
  readonly resolve: (r: RolloutResult[]) => void;
  readonly reject: (e: Error) => void;
}

/**
 * Runs batches over any transport: cuts a batch into jobs, keeps up to the transport's capacity
 * in flight, gathers results by task index (so who computed a result never matters), gives each
 * job a time limit, and re-runs the tasks of a lost job one by one; a task lost twice fails the
 * batch. After more than 2·capacity + 2 lost jobs in a row with none finished, the transport is
 * taken as broken: it is closed, and this and every later batch reject.
 */
export class ScheduledEvaluator implements Evaluator {
  private readonly timeoutMs: number;
  private current: Current | null = null;
  private batchCounter = 0;
  private jobCounter = 0;
  private failuresSinceSuccess = 0;
  private broken: Error | null = null;
  private closed = false;
  /** Finish times (ms) and sizes of recent jobs, for rollouts per second. */
  private readonly recent: { at: number; tasks: number }[] = [];

  constructor(protected readonly transport: Transport, private readonly options: SchedulerOptions = {}) {
    this.timeoutMs = options.taskTimeoutMs ?? 120_000;
  }

  evaluate(batch: Batch): Promise<RolloutResult[]> {
    if (this.closed) return Promise.reject(new Error('evaluator is closed'));
    if (this.broken) return Promise.reject(this.broken);
    if (this.current) return Promise.reject(new Error('evaluate called while a batch is running'));
    const n = batch.tasks.length;
    if (n === 0) return Promise.resolve([]);
    const size = Math.max(1, this.transport.jobSize(n));
    const queue: Job[] = [];
    for (let i = 0; i < n; i += size) {
      queue.push({ id: this.jobCounter++, items: batch.tasks.slice(i, i + size).map((task, k) => ({ index: i + k, task, attempt: 0 })) });
    }
    const { tasks: _tasks, ...tables } = batch;
    // Threads and connections are unref'd so a finished program exits by itself; while a batch
    // runs, this timer keeps the process alive even while a replacement is being started.
    const keepAlive = setInterval(() => undefined, 60_000);
    return new Promise((res, rej) => {
      this.current = {
        ref: { id: this.batchCounter++, tables }, queue, results: new Array(n), remaining: n, inFlight: 0,
        resolve: (r) => { clearInterval(keepAlive); res(r); },
        reject: (e) => { clearInterval(keepAlive); rej(e); },
      };
      this.pump();
    });
  }

  private pump(): void {
    const cur = this.current;
    while (cur && this.current === cur && cur.queue.length > 0 && cur.inFlight < this.transport.capacity()) {
      this.start(cur, cur.queue.shift()!);
    }
  }

  private start(cur: Current, job: Job): void {
    cur.inFlight++;
    let settled = false;
    let timer: NodeJS.Timeout | null = null;
    const finish = (fn: () => void): void => {
      if (settled) return;
      settled = true;
      if (timer) clearTimeout(timer);
      fn();
    };
    const running = this.transport.run(cur.ref, job.items);
    // The time limit counts from when the job reaches whatever runs it, not while it waits for
    // a thread to be started.
    const arm = (): void => {
      if (settled || !Number.isFinite(this.timeoutMs)) return;
      const ms = this.timeoutMs * job.items.length;
      timer = setTimeout(() => finish(() => {
        running.abandon();
        this.lost(cur, job, `task timed out after ${ms / 1000} s`);
      }), ms);
    };
    if (running.started) void running.started.then(arm);
    else arm();
    running.result.then(
      (results) => finish(() => this.done(cur, job, results)),
      (e: Error & { fatal?: boolean }) => finish(() => (e.fatal ? this.fatal(cur, e) : this.lost(cur, job, e.message))),
    );
  }

  private done(cur: Current, job: Job, results: readonly RolloutResult[]): void {
    cur.inFlight--;
    if (this.current !== cur) return;
    this.failuresSinceSuccess = 0;
    this.recent.push({ at: performance.now(), tasks: job.items.length });
    this.trimRecent();
    job.items.forEach((item, k) => (cur.results[item.index] = results[k]));
    cur.remaining -= job.items.length;
    if (cur.remaining === 0) {
      this.current = null;
      cur.resolve(cur.results);
      return;
    }
    this.pump();
  }

  /** A job that threw, lost its worker or overran its time: its tasks run again one by one. */
  private lost(cur: Current, job: Job, reason: string): void {
    cur.inFlight--;
    if (this.closed || this.current !== cur) return;
    this.failuresSinceSuccess++;
    this.options.onEvent?.({ kind: 'retried', reason, tasks: job.items.map((i) => i.index) });
    const twice = job.items.find((i) => i.attempt >= 1);
    if (twice) {
      this.fail(new Error(`task ${twice.index} (${twice.task.kind}) failed twice: ${reason}`));
    } else {
      for (const item of [...job.items].reverse()) cur.queue.unshift({ id: this.jobCounter++, items: [{ ...item, attempt: item.attempt + 1 }] });
    }
    if (this.failuresSinceSuccess > 2 * this.transport.capacity() + 2) {
      this.broken = new Error(`${this.transport.name} keep failing (${this.failuresSinceSuccess} times in a row), last: ${reason}`);
      this.fail(this.broken);
      void this.transport.close();
      return;
    }
    this.pump();
  }

  /** A transport failure that retrying cannot mend ends the batch at once. */
  private fatal(cur: Current, e: Error): void {
    cur.inFlight--;
    if (this.current === cur) this.fail(e);
  }

  private fail(e: Error): void {
    const cur = this.current;
    this.current = null;
    cur?.reject(e);
  }

  status(): BackendStatus {
    this.trimRecent();
    const tasks = this.recent.reduce((s, r) => s + r.tasks, 0);
    return { ...this.transport.status?.(), rolloutsPerSecond: tasks / (RATE_WINDOW_MS / 1000) };
  }

  private trimRecent(): void {
    const now = performance.now();
    while (this.recent.length > 0 && now - this.recent[0].at > RATE_WINDOW_MS) this.recent.shift();
  }

  async close(): Promise<void> {
    if (this.closed) return;
    this.closed = true;
    this.fail(new Error('evaluator closed while a batch was running'));
    await this.transport.close();
  }
}
