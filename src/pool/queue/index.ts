export { QueueTransport, FatalTransportError } from './coordinator.js';
export type { QueueTransportOptions } from './coordinator.js';
export { serveQueue } from './serve.js';
export type { ServeOptions, QueueWorker } from './serve.js';
export { parseRedisUrl, redisOptions } from './url.js';
export type { RedisAddress } from './url.js';
export { parseJobData, parseTables, JOB_FORMAT } from './payload.js';
export type { JobData, JobReturn } from './payload.js';
export { QueueKeys, QUEUE_TIMING } from './names.js';
