import { defaultWorkerCount, threads, type Backend } from '../pool/index.js';
import { intIn } from './options.js';
import type { Command } from 'commander';

/** Adds `--workers N` to a command. */
export function workersOption(cmd: Command, what = 'worker threads (0 = this thread); results do not depend on it'): Command {
  return cmd.option('--workers <n>', what, intIn(0, 1024), defaultWorkerCount());
}

/** The backend description a command's options name. */
export function backendOf(o: { workers: number }): Backend {
  return threads(o.workers);
}
