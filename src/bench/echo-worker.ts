/**
 * A queue consumer for `cairn bench --queue` only: it takes jobs from the queue like `cairn
 * worker` and answers each with empty results, without validating or running anything. With it
 * the coordinator and Redis are timed on the wall clock while consumers cost as little as
 * BullMQ allows. It is started as a child process (`node echo-worker.js URL QUEUE CONCURRENCY`)
 * and stops on SIGTERM. Never use it for a run: its results are not rollouts.
 */
import { Worker, type Job } from 'bullmq';
import { parseRedisUrl, QueueKeys, redisOptions } from '../pool/queue/index.js';

async function main(): Promise<void> {
  const [url, queue, concurrency] = process.argv.slice(2);
  const keys = new QueueKeys(queue);
  const answer = async (job: Job): Promise<{ results: object[] }> => {
    const items = (job.data as { items?: unknown[] }).items ?? [];
    return { results: items.map(() => ({})) };
  };
  const worker = new Worker(queue, answer, { connection: redisOptions(parseRedisUrl(url)), prefix: keys.prefix, concurrency: Number(concurrency) });
  worker.on('error', () => undefined);
  await worker.waitUntilReady();
  process.stderr.write(`echo consumer on queue ${queue}\n`);
  process.once('SIGTERM', () => void worker.close().then(() => process.exit(0)));
}

void main();
