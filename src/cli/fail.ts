import { UserError } from '../core/index.js';

/** Exit codes of the command-line contract. */
export const EXIT = { ok: 0, failure: 1, badInput: 2, sigint: 130, sigterm: 143 } as const;

/** Prints an error the way the contract says: one message, no stack trace for bad input. */
export function reportError(e: unknown): number {
  if (e instanceof UserError) {
    process.stderr.write(`cairn: ${e.message}\n`);
    return EXIT.badInput;
  }
  const err = e as Error;
  process.stderr.write(`cairn: ${err?.message ?? String(e)}\n`);
  if (process.env.CAIRN_DEBUG) process.stderr.write(`${err?.stack ?? ''}\n`);
  return EXIT.failure;
}
