import { availableParallelism } from 'node:os';
import { InlineEvaluator } from './inline.js';
import { QueueTransport } from './queue/coordinator.js';
import { parseRedisUrl } from './queue/url.js';
import { ScheduledEvaluator, type SchedulerOptions } from './scheduler.js';
import type { Evaluator } from './task.js';
import { ThreadEvaluator } from './threads.js';

/** The machine's available parallelism: the default worker count. */
export function defaultWorkerCount(): number {
  return availableParallelism();
}

/**
 * Where rollouts run: threads of this process (0 = the calling thread itself), or `cairn worker`
 * processes anywhere that take jobs from a Redis queue.
 */
export type Backend =
  | { readonly kind: 'threads'; readonly workers: number }
  | { readonly kind: 'queue'; readonly url: string; readonly queue: string; readonly redisTimeoutS: number };

/** A backend of `workers` threads of this process. */
export function threads(workers: number): Backend {
  return { kind: 'threads', workers };
}

/** A queue backend; the URL is checked here (bad input), so nothing starts with a malformed one. */
export function queueBackend(url: string, queue = 'cairn', redisTimeoutS = 600): Backend {
  parseRedisUrl(url);
  return { kind: 'queue', url, queue, redisTimeoutS };
}

/** The evaluator a backend description names. */
export function makeEvaluator(backend: Backend, options: SchedulerOptions = {}): Evaluator {
  if (backend.kind === 'queue') {
    const transport = new QueueTransport({ address: parseRedisUrl(backend.url), queue: backend.queue, redisTimeoutS: backend.redisTimeoutS });
    // No time limit per task: a job may wait for a worker to connect; lost workers are BullMQ's stalled jobs.
    return new ScheduledEvaluator(transport, { ...options, taskTimeoutMs: Infinity });
  }
  return backend.workers === 0 ? new InlineEvaluator() : new ThreadEvaluator(backend.workers, options);
}

/** A short description for progress lines and logs, without credentials ("2 worker threads"). */
export function describeBackend(backend: Backend): string {
  if (backend.kind === 'queue') return `queue "${backend.queue}" at ${parseRedisUrl(backend.url).display}`;
  return backend.workers === 0 ? 'this thread' : `${backend.workers} worker thread${backend.workers === 1 ? '' : 's'}`;
}
