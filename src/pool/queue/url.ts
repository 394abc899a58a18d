import { UserError } from '../../core/index.js';

/** Where a Redis server is, parsed from `redis://[user][:password@]host[:port][/db]`. */
export interface RedisAddress {
  readonly host: string;
  readonly port: number;
  readonly db: number;
  readonly username?: string;
  readonly password?: string;
  /** The address without credentials: the only form ever printed or logged. */
  readonly display: string;
}

/** Parses a queue URL; a malformed one is bad input. The password never appears in a message. */
export function parseRedisUrl(text: string, where = '--queue'): RedisAddress {
  let u: URL;
  try {
    u = new URL(text);
  } catch {
    throw new UserError(`${where}: expected a URL like redis://host:6379/0, found something that is not a URL`);
  }
  if (u.protocol !== 'redis:') throw new UserError(`${where}: expected a redis:// URL, found the scheme "${u.protocol.replace(/:$/, '')}"`);
  if (u.hostname === '') throw new UserError(`${where}: the URL names no host`);
  const port = u.port === '' ? 6379 : Number(u.port);
  const path = u.pathname.replace(/^\//, '');
  if (path !== '' && !/^\d{1,2}$/.test(path)) throw new UserError(`${where}: expected a database number after the host (e.g. /0), found "/${path}"`);
  const db = path === '' ? 0 : Number(path);
  if (u.search !== '' || u.hash !== '') throw new UserError(`${where}: the URL takes no query or fragment`);
  // URL keeps the brackets of an IPv6 host in `hostname`: the display form keeps them, ioredis gets the bare address.
  const display = `redis://${u.hostname}:${port}/${db}`;
  return {
    host: u.hostname.replace(/^\[|\]$/g, ''), port, db, display,
    ...(u.username ? { username: decodeURIComponent(u.username) } : {}),
    ...(u.password ? { password: decodeURIComponent(u.password) } : {}),
  };
}

/** ioredis options for an address. Queue connections must wait, not fail, while Redis is away. */
export function redisOptions(a: RedisAddress): Record<string, unknown> {
  return {
    host: a.host, port: a.port, db: a.db, username: a.username, password: a.password,
    maxRetriesPerRequest: null, enableReadyCheck: true,
    // Reconnect forever, at most every 2 s: a restarted Redis is found again without a restart of cairn.
    retryStrategy: (times: number) => Math.min(200 * times, 2000),
  };
}
