import type { Command } from 'commander';
import { defaultWorkerCount, parseRedisUrl, serveQueue } from '../../pool/index.js';
import { UserError } from '../../core/index.js';
import { EXIT } from '../fail.js';
import { intIn } from '../options.js';

interface WorkerOptions { queue?: string; queueName: string; threads: number; quiet?: boolean }

/** Runs until SIGINT or SIGTERM, then finishes the jobs in hand and exits 130 or 143. */
async function workerAction(o: WorkerOptions): Promise<void> {
  const url = o.queue ?? process.env.CAIRN_QUEUE;
  if (!url) throw new UserError('cairn worker needs --queue redis://host:port/db (or CAIRN_QUEUE in the environment)');
  const address = parseRedisUrl(url);
  const log = (line: string): void => {
    if (!o.quiet) process.stderr.write(`${new Date().toISOString()} ${line}\n`);
  };
  const w = await serveQueue({ address, queue: o.queueName, threads: o.threads, log });
  const signal = await new Promise<'SIGINT' | 'SIGTERM'>((resolve) => {
    process.once('SIGINT', () => resolve('SIGINT'));
    process.once('SIGTERM', () => resolve('SIGTERM'));
  });
  log(`${signal}: finishing the jobs in hand (${w.counts.done} done, ${w.counts.failed} failed, ${w.counts.stale} stale skipped)`);
  await w.close();
  process.exitCode = signal === 'SIGINT' ? EXIT.sigint : EXIT.sigterm;
}

export function registerWorker(program: Command): void {
  program
    .command('worker')
    .description('take rollout jobs from a Redis queue and run them on this machine\'s threads (for runs started with --queue)')
    .option('--queue <url>', 'Redis URL, redis://[:password@]host:port/db (default: $CAIRN_QUEUE)')
    .option('--queue-name <name>', 'queue shared with the runs', 'cairn')
    .option('--threads <n>', 'worker threads (jobs run at once)', intIn(1, 1024), defaultWorkerCount())
    .option('--quiet', 'no log lines on stderr')
    .action(workerAction);
}
