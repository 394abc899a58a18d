import type { Command } from 'commander';
import { defaultWorkerCount, queueBackend, threads, type Backend } from '../pool/index.js';
import { intIn, numberIn } from './options.js';

/** Adds `--workers N` to a command. */
export function workersOption(cmd: Command, what = 'worker threads (0 = this thread); results do not depend on it'): Command {
  return cmd.option('--workers <n>', what, intIn(0, 1024), defaultWorkerCount());
}

/** Adds `--workers N` and the queue options to a command that runs a run's iterations. */
export function backendOptions(cmd: Command): Command {
  return workersOption(cmd)
    .option('--queue <url>', 'run rollouts on `cairn worker` processes through Redis (redis://[:password@]host:port/db; or set CAIRN_QUEUE)')
    .option('--queue-name <name>', 'queue shared with the workers', 'cairn')
    .option('--redis-timeout <s>', 'with --queue: how long Redis may be unreachable before the run stops with a checkpoint (exit 1)', numberIn(1, 1e7), 600);
}

export interface BackendFlags { workers: number; queue?: string; queueName?: string; redisTimeout?: number }

/** The backend description a command's options name: a queue when --queue (or CAIRN_QUEUE) is given, else threads. */
export function backendOf(o: BackendFlags): Backend {
  const url = o.queue ?? (o.queueName !== undefined ? process.env.CAIRN_QUEUE : undefined);
  return url ? queueBackend(url, o.queueName ?? 'cairn', o.redisTimeout ?? 600) : threads(o.workers);
}
