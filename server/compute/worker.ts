/**
 * Entry of a compute worker thread: the pool posts a task message with a port, this says
 * "started" on the port (the time limit counts from here, not from the wait for a
 * thread) and runs the task.
 */
import type { MessagePort } from 'node:worker_threads';
import { runTask, type TaskMessage } from './tasks.js';

export default function computeWorker({ message, started }: { message: TaskMessage; started: MessagePort }): unknown {
  started.postMessage('started');
  started.close();
  return runTask(message);
}
