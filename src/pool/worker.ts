import { parentPort } from 'node:worker_threads';
import { runTask } from './run-task.js';
import { serveTasks } from './worker-loop.js';

/** The pool's worker thread: cairn's tasks, nothing else. */
serveTasks(parentPort!, (tables, task) => runTask(tables, task));
