/**
 * Runs over the Redis queue backend, against a real redis-server and real `cairn worker`
 * processes (BullMQ over ioredis; no mock queue): the fingerprint equals the local run's with
 * one and two workers, after a worker is killed with SIGKILL, after Redis restarts, and after
 * the coordinator itself is killed and resumed.
 */
import { readFileSync, readdirSync, rmSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, afterEach, beforeAll, describe, expect, it } from 'vitest';
import { cli, cliOk, ensureBuilt, lineCount, SLOW, startCli, status, tempDir, waitFor, writeTinyRecipe, type Started } from '../store/helpers.js';
import { startRedis, type RedisServer } from '../../src/bench/redis-server.js';

let root = '';
let recipe = '';
let reference = '';
let redis: RedisServer;
const workers: Started[] = [];

/** Starts `cairn worker` on `url` and waits for its start line. */
async function worker(url: string, threads = 1, queue = 'cairn'): Promise<Started> {
  const w = startCli(['worker', '--queue', url, '--threads', String(threads), '--queue-name', queue]);
  workers.push(w);
  await waitFor('the worker to start', () => /worker \S+: \d+ threads? on queue/.test(w.out().stderr), 60_000);
  return w;
}

async function stopWorkers(): Promise<void> {
  for (const w of workers.splice(0)) {
    if (w.child.exitCode === null && w.child.signalCode === null) w.child.kill('SIGTERM');
    await w.done;
  }
}

beforeAll(async () => {
  ensureBuilt();
  root = tempDir('queue');
  recipe = writeTinyRecipe(root, { budget: { iterations: 8 } });
  const local = join(root, 'local');
  await cliOk(['run', recipe, '--out', local, '--workers', '0', '--quiet']);
  reference = (await status(local)).fingerprint;
  redis = await startRedis();
}, SLOW);

afterEach(stopWorkers, SLOW);

afterAll(async () => {
  await stopWorkers();
  await redis?.stop();
  rmSync(root, { recursive: true, force: true });
}, SLOW);

describe('a run over the queue', () => {
  it.each([1, 2])('with %i worker process(es) has the local fingerprint', async (n) => {
    for (let i = 0; i < n; i++) await worker(redis.url);
    const out = join(root, `workers-${n}`);
    await cliOk(['run', recipe, '--out', out, '--queue', redis.url, '--quiet']);
    expect((await status(out)).fingerprint).toBe(reference);
  }, SLOW);

  it('says no worker is connected while none is, then goes on when one comes', async () => {
    const out = join(root, 'late-worker');
    const run = startCli(['run', recipe, '--out', out, '--queue', redis.url]);
    await waitFor('the run to say no worker is connected', () => /no worker connected to queue "cairn" at redis:\/\/127\.0\.0\.1/.test(run.out().stderr), 60_000);
    // status reads what the running process says about itself.
    const live = (await cliOk(['status', out, '--json'])).stdout;
    expect(JSON.parse(live).live).toMatchObject({ pid: run.child.pid, backend: expect.stringMatching(/^queue "cairn" at redis:\/\/127\.0\.0\.1:\d+\/0$/), workers: 0, waiting: expect.stringMatching(/no worker connected/) });
    await worker(redis.url);
    const r = await run.done;
    expect(r.code, r.stderr).toBe(0);
    expect((await status(out)).fingerprint).toBe(reference);
    expect(JSON.parse((await cliOk(['status', out, '--json'])).stdout).live).toBeNull();
  }, SLOW);

  it('survives a worker killed with SIGKILL mid-job: its job goes back to the queue (BullMQ stalled jobs) and runs elsewhere, same fingerprint', async () => {
    // The doomed worker is alone at first, so it holds a job whenever the run is mid-batch.
    const doomed = await worker(redis.url);
    const out = join(root, 'killed-worker');
    const run = startCli(['run', recipe, '--out', out, '--queue', redis.url]);
    await waitFor('two iterations', () => lineCount(join(out, 'metrics.jsonl')) >= 2, 120_000);
    doomed.child.kill('SIGKILL');
    const killedAt = lineCount(join(out, 'metrics.jsonl'));
    await worker(redis.url);
    const r = await run.done;
    expect(r.code, r.stderr).toBe(0);
    expect(killedAt).toBeLessThan(8);
    expect((await status(out)).fingerprint).toBe(reference);
  }, SLOW);

  it('waits while Redis is stopped and restarted mid-run, says so, and ends with the same fingerprint', async () => {
    await worker(redis.url);
    const out = join(root, 'redis-restart');
    const run = startCli(['run', recipe, '--out', out, '--queue', redis.url]);
    await waitFor('two iterations', () => lineCount(join(out, 'metrics.jsonl')) >= 2, 120_000);
    const port = redis.port;
    await redis.stop();
    await waitFor('the run to say it waits for Redis', () => /Redis at redis:\/\/127\.0\.0\.1:\d+\/0 unreachable .* waiting/.test(run.out().stderr), 60_000);
    redis = await startRedis(port);
    const r = await run.done;
    expect(r.code, r.stderr).toBe(0);
    expect((await status(out)).fingerprint).toBe(reference);
  }, SLOW);

  it('stops with exit 1 and a valid checkpoint when Redis stays away past --redis-timeout; a resume ends the same', async () => {
    await worker(redis.url);
    const out = join(root, 'redis-gone');
    const run = startCli(['run', recipe, '--out', out, '--queue', redis.url, '--redis-timeout', '3']);
    await waitFor('two iterations', () => lineCount(join(out, 'metrics.jsonl')) >= 2, 120_000);
    const port = redis.port;
    await redis.stop();
    const r = await run.done;
    redis = await startRedis(port);
    expect(r.code).toBe(1);
    expect(r.stderr).toMatch(/Redis at redis:\/\/127\.0\.0\.1:\d+\/0 unreachable for more than 3 s/);
    expect(r.stderr).not.toMatch(/^\s+at /m);
    const stopped = await status(out);
    expect(stopped.iteration).toBeGreaterThanOrEqual(2);
    await cliOk(['resume', out, '--workers', '0', '--quiet']);
    expect((await status(out)).fingerprint).toBe(reference);
  }, SLOW);

  it('ignores the jobs of an earlier process when a killed coordinator is resumed', async () => {
    await worker(redis.url);
    const out = join(root, 'killed-coordinator');
    const run = startCli(['run', recipe, '--out', out, '--queue', redis.url]);
    await waitFor('three iterations', () => lineCount(join(out, 'metrics.jsonl')) >= 3, 120_000);
    run.child.kill('SIGKILL');
    await run.done;
    await cliOk(['resume', out, '--queue', redis.url, '--quiet']);
    expect((await status(out)).fingerprint).toBe(reference);
  }, SLOW);
});

describe('a queue URL', () => {
  it('with a password is never printed or written: not by the run, the worker, nor into the run directory', async () => {
    const secret = 'Sesame-4711-secret';
    const locked = await startRedis(undefined, ['--requirepass', secret], secret);
    try {
      const url = `redis://:${secret}@127.0.0.1:${locked.port}/0`;
      const w = await worker(url);
      const out = join(root, 'password');
      const r = await cliOk(['run', recipe, '--out', out, '--queue', url]);
      expect((await status(out)).fingerprint).toBe(reference);
      const printed = [r.stdout, r.stderr, w.out().stdout, w.out().stderr].join('\n');
      expect(printed).toMatch(/redis:\/\/127\.0\.0\.1:\d+\/0/);
      expect(printed).not.toContain(secret);
      for (const f of readdirSync(out, { recursive: true, encoding: 'utf8' })) {
        if (!f.endsWith('.json') && !f.endsWith('.jsonl')) continue;
        expect(readFileSync(join(out, f), 'utf8'), f).not.toContain(secret);
      }
      await stopWorkers();
    } finally {
      await locked.stop();
    }
  }, SLOW);

  it.each([
    ['http://127.0.0.1:6379', /expected a redis:\/\/ URL, found the scheme "http"/],
    ['redis://127.0.0.1:6379/db', /expected a database number/],
    ['not a url', /not a URL/],
  ])('%s is refused: exit 2, one message, nothing written', async (url, message) => {
    const out = join(root, 'bad-url');
    const r = await cli(['run', recipe, '--out', out, '--queue', url]);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(message);
    expect(r.stderr.trim().split('\n')).toHaveLength(1);
    expect(() => readdirSync(out)).toThrow();
  });
});
