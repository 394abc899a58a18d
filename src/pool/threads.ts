import { existsSync } from 'node:fs';
import { dirname, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import type { Worker } from 'node:worker_threads';
import Pool from 'worker-threads-pool';
import type { RolloutResult } from '../sim/index.js';
import type { FromWorker, ToWorker } from './messages.js';
import type { Batch, Evaluator, PoolEvent, Task } from './task.js';

/** Compiled worker script. Under a TypeScript test runner this module is the .ts source, so point at the build. */
function workerFile(): string {
  const here = fileURLToPath(import.meta.url);
  const file = here.endsWith('.ts') ? resolve(dirname(here), '../../dist/pool/worker.js') : resolve(dirname(here), 'worker.js');
  if (!existsSync(file)) throw new Error(`worker script ${file} is missing: run \`npm run build\` first`);
  return file;
}

export interface ThreadOptions {
  /** Wall-clock limit of one task, ms; a job of k tasks gets k times this. Default 120 000. */
  readonly taskTimeoutMs?: number;
  /** Told about every worker replacement. */
  readonly onEvent?: (e: PoolEvent) => void;
}

interface Item { readonly index: number; readonly task: Task; readonly attempt: number }
interface Job { readonly id: number; readonly items: readonly Item[] }
interface Slot { worker: Worker; job: Job | null; tablesFor: number; timer: NodeJS.Timeout | null; dead: boolean }
interface Current {
  readonly id: number;
  readonly batch: Batch;
  readonly queue: Job[];
  readonly results: RolloutResult[];
  remaining: number;
  readonly resolve: (r: RolloutResult[]) => void;
  readonly reject: (e: Error) => void;
}

/**
 * Persistent worker threads fed jobs by message. Threads are acquired once from
 * `worker-threads-pool` (whose `acquire` builds a new Worker per call) and kept for the life of
 * the evaluator, so the JIT warm-up is paid once. A thread that throws, exits or overruns its
 * time limit is replaced and its tasks re-run one by one; a task that fails twice fails the batch.
 * Threads that keep failing with no job finished in between are no longer replaced, and this and
 * every later batch reject instead of waiting for threads that will never come.
 */
export class ThreadEvaluator implements Evaluator {
  private readonly pool: Pool;
  private readonly slots: Slot[] = [];
  private readonly file: string;
  private readonly timeoutMs: number;
  private current: Current | null = null;
  private batchCounter = 0;
  private jobCounter = 0;
  private failuresSinceSuccess = 0;
  /** Set once threads kept failing and were no longer replaced: later batches would wait forever. */
  private broken: Error | null = null;
  private closed = false;

  constructor(readonly workers: number, private readonly options: ThreadOptions = {}) {
    if (!Number.isInteger(workers) || workers < 1) throw new Error(`ThreadEvaluator needs at least one worker, got ${workers}`);
    this.file = workerFile();
    this.timeoutMs = options.taskTimeoutMs ?? 120_000;
    this.pool = new Pool({ max: workers });
    for (let i = 0; i < workers; i++) this.spawn();
  }

  private spawn(): void {
    this.pool.acquire(this.file, (err, worker) => {
      if (err) throw err;
      const slot: Slot = { worker, job: null, tablesFor: -1, timer: null, dead: false };
      worker.on('message', (m: FromWorker) => this.onDone(slot, m));
      worker.on('error', (e) => this.onFailure(slot, `worker threw: ${e.message}`));
      worker.on('exit', (code) => this.onFailure(slot, `worker exited with code ${code}`));
      // After the listeners: Node refs a worker's message port again when the first 'message'
      // listener is added, and a thread that never ran a job would then keep the process alive.
      worker.unref();
      if (this.closed) void worker.terminate();
      else {
        this.slots.push(slot);
        this.pump();
      }
    });
  }

  evaluate(batch: Batch): Promise<RolloutResult[]> {
    if (this.closed) return Promise.reject(new Error('evaluator is closed'));
    if (this.broken) return Promise.reject(this.broken);
    if (this.current) return Promise.reject(new Error('evaluate called while a batch is running'));
    const n = batch.tasks.length;
    if (n === 0) return Promise.resolve([]);
    // Many small jobs per worker balance rollouts of uneven length (a fall ends one early); a
    // round trip costs ~0.15 ms against ~10–100 ms a rollout, so small jobs are cheap.
    const size = Math.max(1, Math.min(16, Math.ceil(n / (this.workers * 16))));
    const queue: Job[] = [];
    for (let i = 0; i < n; i += size) {
      const items = batch.tasks.slice(i, i + size).map((task, k) => ({ index: i + k, task, attempt: 0 }));
      queue.push({ id: this.jobCounter++, items });
    }
    // Idle threads are unref'd so a finished program exits by itself; while a batch runs, this
    // timer keeps the process alive even in the moment a replacement thread is being started.
    const keepAlive = setInterval(() => undefined, 60_000);
    const settle = (): void => clearInterval(keepAlive);
    return new Promise((res, rej) => {
      this.current = {
        id: this.batchCounter++, batch, queue, results: new Array(n), remaining: n,
        resolve: (r) => { settle(); res(r); },
        reject: (e) => { settle(); rej(e); },
      };
      this.pump();
    });
  }

  private pump(): void {
    const cur = this.current;
    if (!cur) return;
    for (const slot of this.slots) {
      if (cur.queue.length === 0) return;
      if (slot.job || slot.dead) continue;
      this.dispatch(slot, cur, cur.queue.shift()!);
    }
  }

  private dispatch(slot: Slot, cur: Current, job: Job): void {
    if (slot.tablesFor !== cur.id) {
      const { tasks: _tasks, ...tables } = cur.batch;
      this.post(slot, { type: 'tables', batch: cur.id, tables });
      slot.tablesFor = cur.id;
    }
    slot.job = job;
    slot.worker.ref();
    slot.timer = setTimeout(() => {
      void slot.worker.terminate();
      this.onFailure(slot, `task timed out after ${(this.timeoutMs * job.items.length) / 1000} s`);
    }, this.timeoutMs * job.items.length);
    this.post(slot, { type: 'run', batch: cur.id, job: job.id, items: job.items });
  }

  private post(slot: Slot, msg: ToWorker): void {
    slot.worker.postMessage(msg);
  }

  private release(slot: Slot): void {
    if (slot.timer) clearTimeout(slot.timer);
    slot.timer = null;
    slot.job = null;
    slot.worker.unref();
  }

  private onDone(slot: Slot, msg: FromWorker): void {
    if (slot.dead) return;
    const job = slot.job;
    this.release(slot);
    const cur = this.current;
    if (cur && job && msg.batch === cur.id && msg.job === job.id) {
      this.failuresSinceSuccess = 0;
      job.items.forEach((item, k) => (cur.results[item.index] = msg.results[k]));
      cur.remaining -= job.items.length;
      if (cur.remaining === 0) {
        this.current = null;
        cur.resolve(cur.results);
        return;
      }
    }
    this.pump();
  }

  private onFailure(slot: Slot, reason: string): void {
    if (slot.dead) return;
    slot.dead = true;
    const job = slot.job;
    this.release(slot);
    this.slots.splice(this.slots.indexOf(slot), 1);
    if (this.closed) return;
    this.failuresSinceSuccess++;
    const cur = this.current;
    if (cur && job && slot.tablesFor === cur.id) this.requeue(cur, job, reason);
    if (this.failuresSinceSuccess > 2 * this.workers + 2) {
      this.broken = new Error(`worker threads keep failing (${this.failuresSinceSuccess} times in a row), last: ${reason}`);
      this.fail(this.broken);
      return;
    }
    this.spawn();
  }

  /** Re-runs a failed job's tasks one by one; a task on its second failure fails the batch. */
  private requeue(cur: Current, job: Job, reason: string): void {
    this.options.onEvent?.({ kind: 'worker-replaced', reason, tasks: job.items.map((i) => i.index) });
    const twice = job.items.find((i) => i.attempt >= 1);
    if (twice) {
      this.fail(new Error(`task ${twice.index} (${twice.task.kind}) failed twice: ${reason}`));
      return;
    }
    for (const item of [...job.items].reverse()) cur.queue.unshift({ id: this.jobCounter++, items: [{ ...item, attempt: item.attempt + 1 }] });
  }

  private fail(e: Error): void {
    const cur = this.current;
    this.current = null;
    cur?.reject(e);
  }

  async close(): Promise<void> {
    if (this.closed) return;
    this.closed = true;
    this.fail(new Error('evaluator closed while a batch was running'));
    const slots = this.slots.splice(0);
    await Promise.all(slots.map((s) => { this.release(s); return s.worker.terminate(); }));
  }
}
