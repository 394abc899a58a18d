import { styleText } from 'node:util';

/**
 * Progress on stderr: redrawn in place on a terminal, one plain line every `everyMs` otherwise
 * (logs stay readable). Silent when `quiet`.
 */
export class Progress {
  private lastPlain = -Infinity;
  private drawn = false;
  private readonly tty: boolean;

  constructor(private readonly quiet: boolean, private readonly everyMs = 5000) {
    this.tty = process.stderr.isTTY === true;
  }

  update(text: string, force = false): void {
    if (this.quiet) return;
    if (this.tty) {
      process.stderr.write(`\r\x1b[2K${text}`);
      this.drawn = true;
      return;
    }
    const now = performance.now();
    if (force || now - this.lastPlain >= this.everyMs) {
      process.stderr.write(`${text}\n`);
      this.lastPlain = now;
    }
  }

  /** Ends the in-place line (if any) so later output starts on a fresh line. */
  done(): void {
    if (this.drawn) process.stderr.write('\n');
    this.drawn = false;
  }

  /** A note on its own line. */
  note(text: string): void {
    if (this.quiet) return;
    this.done();
    process.stderr.write(`${styleText('dim', text)}\n`);
  }
}

/** "1 m 05 s" style duration. */
export function formatDuration(seconds: number): string {
  if (!Number.isFinite(seconds)) return '?';
  const s = Math.round(seconds);
  if (s < 60) return `${s} s`;
  const m = Math.floor(s / 60);
  if (m < 60) return `${m} m ${String(s % 60).padStart(2, '0')} s`;
  return `${Math.floor(m / 60)} h ${String(m % 60).padStart(2, '0')} m`;
}

