/**
 * A throwaway Redis server for queue benchmarks and tests: Debian's redis-server, started on a
 * free localhost port without persistence, and stopped by its pid.
 */
import { spawn, type ChildProcess } from 'node:child_process';
import { createConnection, createServer } from 'node:net';

/** A port nothing listens on now (the OS picks it). */
export function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const s = createServer();
    s.once('error', reject);
    s.listen(0, '127.0.0.1', () => {
      const port = (s.address() as { port: number }).port;
      s.close(() => resolve(port));
    });
  });
}

/** True when a Redis server answers PING on `port` (the RESP inline command; reply "+PONG"). */
export function pings(port: number, password?: string): Promise<boolean> {
  return new Promise((resolve) => {
    const c = createConnection({ host: '127.0.0.1', port });
    let got = '';
    c.setTimeout(1000, () => { c.destroy(); resolve(false); });
    c.once('error', () => resolve(false));
    c.on('data', (d) => {
      got += d.toString();
      if (got.includes('+PONG')) { c.destroy(); resolve(true); }
    });
    c.once('connect', () => c.write(`${password ? `AUTH ${password}\r\n` : ''}PING\r\n`));
  });
}

export interface RedisServer {
  readonly port: number;
  readonly url: string;
  readonly process: ChildProcess;
  stop(): Promise<void>;
}

/** Starts redis-server on `port` (a free one by default) and waits until it answers. */
export async function startRedis(port?: number, extra: readonly string[] = [], password?: string): Promise<RedisServer> {
  const p = port ?? (await freePort());
  const child = spawn('redis-server', ['--port', String(p), '--bind', '127.0.0.1', '--save', '', '--appendonly', 'no', ...extra], { stdio: 'ignore' });
  const exited = new Promise<void>((resolve) => child.once('exit', () => resolve()));
  for (let i = 0; i < 100 && !(await pings(p, password)); i++) await new Promise((r) => setTimeout(r, 50));
  if (!(await pings(p, password))) throw new Error(`redis-server did not answer on port ${p}`);
  return {
    port: p,
    url: `redis://127.0.0.1:${p}/0`,
    process: child,
    async stop() {
      if (child.exitCode === null && child.signalCode === null) process.kill(child.pid!, 'SIGTERM');
      await exited;
    },
  };
}
