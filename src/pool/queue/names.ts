/**
 * Redis keys of one queue. BullMQ's own keys live under `cairn:<queue>:…` (its prefix `cairn`);
 * cairn's keys beside them under `cairn:<queue>:x:…`.
 */
export class QueueKeys {
  constructor(readonly queue: string) {}

  /** BullMQ prefix. */
  get prefix(): string {
    return 'cairn';
  }

  /** A batch's shared tables (JSON), written once by the coordinator, read once per batch by each worker process. */
  tables(session: string, batch: number): string {
    return `cairn:${this.queue}:x:tables:${session}:${batch}`;
  }

  /** Present while a coordinator session is alive; jobs of a session without it are stale. */
  session(session: string): string {
    return `cairn:${this.queue}:x:session:${session}`;
  }

  /** One worker process's heartbeat (JSON: host, pid, threads, versions). */
  worker(id: string): string {
    return `cairn:${this.queue}:x:worker:${id}`;
  }

  workerPattern(): string {
    return `cairn:${this.queue}:x:worker:*`;
  }
}

/** Queue settings shared by coordinator and workers, documented in the README. */
export const QUEUE_TIMING = {
  /** A job's lock, ms: a killed worker's jobs go back to waiting once it lapses (renewed every half of it). */
  lockDurationMs: 10_000,
  /** How often workers look for stalled jobs, ms. */
  stalledIntervalMs: 5_000,
  /** Stalls a job survives before it fails (each a lost worker); the coordinator re-queues a failed job once more. */
  maxStalledCount: 5,
  /** Heartbeat period and lifetime of a worker's and a session's key, ms. */
  heartbeatMs: 3_000,
  heartbeatTtlMs: 12_000,
  /** Lifetime of a batch's tables key, s (rewritten if a batch outlives it). */
  tablesTtlS: 6 * 3600,
} as const;
