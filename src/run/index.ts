export { Run } from './run.js';
export type { Opened } from './run.js';
export { loop } from './loop.js';
export type { LoopOptions, StopReason } from './loop.js';
export { startRun, resumeRun } from './session.js';
export type { SessionHooks, SessionResult, ResumeOptions } from './session.js';
export { runStatus, writeReport, writeStrobe, exportRun } from './views.js';
export type { RunStatus, PairRow } from './views.js';
