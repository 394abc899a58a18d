import { existsSync } from 'node:fs';
import { dirname, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import type { Worker } from 'node:worker_threads';
import Pool from 'worker-threads-pool';
import type { RolloutResult } from '../sim/index.js';
import type { FromWorker, ToWorker } from './messages.js';
import { ScheduledEvaluator, type SchedulerOptions } from './scheduler.js';
import type { BatchTables } from './task.js';
import type { BatchRef, JobItem, RunningJob, Transport } from './transport.js';

/** Compiled worker script. Under a TypeScript test runner this module is the .ts source, so point at the build. */
function defaultWorkerFile(): string {
  const here = fileURLToPath(import.meta.url);
  return here.endsWith('.ts') ? resolve(dirname(here), '../../dist/pool/worker.js') : resolve(dirname(here), 'worker.js');
}

export interface ThreadOptions extends SchedulerOptions {
  /** Script each thread runs (default: cairn's worker). Tests give one that can also inject faults. */
  readonly workerFile?: string;
}

interface Pending { readonly batch: BatchRef; readonly items: readonly JobItem[]; readonly job: number; settle: { resolve(r: RolloutResult[]): void; reject(e: Error): void }; readonly dispatched: () => void }
interface Slot { worker: Worker; job: Pending | null; tablesFor: number; tables: BatchTables | null; dead: boolean }

/**
 * Whether two batches share their tables (the same arrays): a queue worker evaluates many jobs
 * of one batch as separate batches, and the thread already holds their tables.
 */
function sameTables(a: BatchTables, b: BatchTables): boolean {
  return a.courses === b.courses && a.plans === b.plans && a.shapes === b.shapes && a.options === b.options && a.bases === b.bases;
}

/**
 * Persistent worker threads fed jobs by message. Threads are acquired once from
 * `worker-threads-pool` (whose `acquire` builds a new Worker per call) and kept for the life of
 * the transport, so the JIT warm-up is paid once. A thread that throws or exits loses its job
 * and is replaced. Each thread gets a batch's tables once, before its first job of that batch.
 */
export class ThreadTransport implements Transport {
  readonly name = 'worker threads';
  private readonly pool: Pool;
  private readonly slots: Slot[] = [];
  private readonly waiting: Pending[] = [];
  private readonly file: string;
  private jobCounter = 0;
  private closed = false;

  constructor(readonly workers: number, workerFile?: string) {
    if (!Number.isInteger(workers) || workers < 1) throw new Error(`ThreadEvaluator needs at least one worker, got ${workers}`);
    this.file = workerFile ?? defaultWorkerFile();
    if (!existsSync(this.file)) throw new Error(`worker script ${this.file} is missing: run \`npm run build\` first`);
    this.pool = new Pool({ max: workers });
    for (let i = 0; i < workers; i++) this.spawn();
  }

  capacity(): number {
    return this.workers;
  }

  jobSize(n: number): number {
    // Many small jobs per thread balance rollouts of uneven length (a fall ends one early); a
    // round trip costs ~0.15 ms against ~10–100 ms a rollout, so small jobs are cheap.
    return Math.min(16, Math.ceil(n / (this.workers * 16)));
  }

  private spawn(): void {
    this.pool.acquire(this.file, (err, worker) => {
      if (err) throw err;
      const slot: Slot = { worker, job: null, tablesFor: -1, tables: null, dead: false };
      worker.on('message', (m: FromWorker) => this.onDone(slot, m));
      worker.on('error', (e) => this.onFailure(slot, `worker threw: ${e.message}`));
      worker.on('exit', (code) => this.onFailure(slot, `worker exited with code ${code}`));
      // After the listeners: Node refs a worker's message port again when the first 'message'
      // listener is added, and a thread that never ran a job would then keep the process alive.
      worker.unref();
      if (this.closed) void worker.terminate();
      else {
        this.slots.push(slot);
        this.dispatch();
      }
    });
  }

  run(batch: BatchRef, items: readonly JobItem[]): RunningJob {
    let pending: Pending;
    let dispatched: () => void = () => undefined;
    const started = new Promise<void>((r) => { dispatched = r; });
    const result = new Promise<RolloutResult[]>((resolve, reject) => {
      pending = { batch, items, job: this.jobCounter++, settle: { resolve, reject }, dispatched };
    });
    if (this.closed) pending!.settle.reject(new Error('worker threads are closed'));
    else {
      this.waiting.push(pending!);
      this.dispatch();
    }
    return {
      result,
      started,
      abandon: () => {
        const i = this.waiting.indexOf(pending);
        if (i >= 0) this.waiting.splice(i, 1);
        const slot = this.slots.find((s) => s.job === pending);
        if (slot) void slot.worker.terminate();
      },
    };
  }

  private dispatch(): void {
    for (const slot of this.slots) {
      if (this.waiting.length === 0) return;
      if (slot.job || slot.dead) continue;
      const p = this.waiting.shift()!;
      if (slot.tablesFor !== p.batch.id && !(slot.tables && sameTables(slot.tables, p.batch.tables))) {
        this.post(slot, { type: 'tables', batch: p.batch.id, tables: p.batch.tables });
        slot.tablesFor = p.batch.id;
        slot.tables = p.batch.tables;
      }
      slot.job = p;
      slot.worker.ref();
      this.post(slot, { type: 'run', batch: slot.tablesFor, job: p.job, items: p.items });
      p.dispatched();
    }
  }

  private post(slot: Slot, msg: ToWorker): void {
    slot.worker.postMessage(msg);
  }

  private release(slot: Slot): Pending | null {
    const job = slot.job;
    slot.job = null;
    slot.worker.unref();
    return job;
  }

  private onDone(slot: Slot, msg: FromWorker): void {
    if (slot.dead) return;
    const job = this.release(slot);
    if (job && msg.job === job.job) job.settle.resolve([...msg.results]);
    this.dispatch();
  }

  private onFailure(slot: Slot, reason: string): void {
    if (slot.dead) return;
    slot.dead = true;
    const job = this.release(slot);
    this.slots.splice(this.slots.indexOf(slot), 1);
    job?.settle.reject(new Error(reason));
    if (!this.closed) this.spawn();
  }

  async close(): Promise<void> {
    if (this.closed) return;
    this.closed = true;
    for (const p of this.waiting.splice(0)) p.settle.reject(new Error('worker threads are closed'));
    const slots = this.slots.splice(0);
    await Promise.all(slots.map((s) => {
      s.dead = true;
      this.release(s)?.settle.reject(new Error('worker threads are closed'));
      return s.worker.terminate();
    }));
  }
}

/** The scheduler over persistent worker threads: `new ThreadEvaluator(n)`. */
export class ThreadEvaluator extends ScheduledEvaluator {
  constructor(readonly workers: number, options: ThreadOptions = {}) {
    super(new ThreadTransport(workers, options.workerFile), options);
  }
}
