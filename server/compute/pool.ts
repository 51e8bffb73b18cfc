/**
 * The compute pool: interpretations, drawings and synthetic lines run in worker threads,
 * never on the service's event loop, so a long line cannot stall `/healthz`, a share link
 * or a colleague's request.
 *
 * - Threads: one per core by default (os.availableParallelism()).
 * - Queue: bounded (`maxQueued`); when full a request is refused at once with 503 and
 *   Retry-After instead of waiting behind work it cannot see.
 * - Time limit: a task still running `timeLimitMs` after a worker took it is cancelled
 *   (its worker is terminated and replaced, so the arithmetic really stops) and answered
 *   with `compute_time_limit`, naming the limit. Nothing is stored. Waiting for a thread
 *   does not count: the queue bounds that.
 * - A client that disconnects cancels its task the same way.
 *
 * Piscina (a well-kept worker-thread pool) does the thread management, the bounded
 * queue and the cancellation by AbortSignal: a hand-written pool would have to get
 * worker recycling after an abort right, which is the hard part.
 */
import { availableParallelism } from 'node:os';
import { MessageChannel } from 'node:worker_threads';
import { Piscina } from 'piscina';
import { AppError } from '../errors.js';
import type { TaskMessage, TaskName, TaskTable } from './tasks.js';

export interface ComputePoolOptions {
  /** Worker threads. Default: the machine's cores. */
  threads?: number;
  /** Tasks allowed to wait for a thread. Default: 4 per thread. */
  maxQueued?: number;
  /** A task running longer than this is cancelled, ms. Default DEFAULT_TIME_LIMIT_MS. */
  timeLimitMs?: number;
}

/**
 * Default time limit per task, ms. A 1024-geophone, 64-shot line (the survey limits) is
 * the largest request; the limit leaves it room while keeping a stuck task from holding
 * a thread for long. Our choice; ARCLINE_TIME_LIMIT_MS changes it.
 */
export const DEFAULT_TIME_LIMIT_MS = 10_000;
/** Tasks that may wait per thread before the service answers 503. Our choice. */
export const QUEUED_PER_THREAD = 4;

/**
 * Memory limits of a compute worker. The per-pair arrays of a large line (about 2,000
 * pairs × 1,024 geophones on a 64-shot line) are Float64Arrays since 2026-12-05
 * (engine/shared/nan-none.ts), so scavenges no longer copy them: garbage collection fell
 * from about 40 % to 10–14 % of a 1,024-geophone, 64-shot line. What the young generation
 * still holds is the short-lived garbage of the fits and scans; with 96 MB (32 MB
 * semi-spaces) instead of V8's default it is scavenged less often: that line took
 * 2.5–3.0 s against 3.2–3.5 s with the default, GC 9–11 % against 11–14 % (same run,
 * worker threads, a loaded 2-core machine, 2026-12-05). Kept; it is an upper bound, not
 * an allocation.
 */
export const WORKER_RESOURCE_LIMITS = { maxYoungGenerationSizeMb: 96 } as const;

/**
 * The worker entry: compiled JavaScript in production (dist/), the TypeScript source
 * through tsx when the service itself runs from source (tests).
 */
function workerEntry(): { filename: string; execArgv: string[] } {
  const fromSource = import.meta.url.endsWith('.ts');
  const filename = new URL(fromSource ? './worker.ts' : './worker.js', import.meta.url).href;
  return { filename, execArgv: fromSource ? ['--import', 'tsx'] : [] };
}

export class ComputePool {
  readonly threads: number;
  readonly maxQueued: number;
  readonly timeLimitMs: number;
  private readonly piscina: Piscina;
  private closing: Promise<void> | undefined;

  constructor(options: ComputePoolOptions = {}) {
    this.threads = Math.max(1, Math.floor(options.threads ?? availableParallelism()));
    this.maxQueued = Math.max(0, Math.floor(options.maxQueued ?? QUEUED_PER_THREAD * this.threads));
    this.timeLimitMs = Math.max(1, options.timeLimitMs ?? DEFAULT_TIME_LIMIT_MS);
    const entry = workerEntry();
    this.piscina = new Piscina({
      filename: entry.filename,
      execArgv: entry.execArgv,
      minThreads: this.threads,
      maxThreads: this.threads,
      maxQueue: this.maxQueued,
      // One task per thread at a time: a second would wait behind the first anyway, and
      // would be lost with it when a time limit terminates the worker.
      concurrentTasksPerWorker: 1,
      resourceLimits: WORKER_RESOURCE_LIMITS,
    });
  }

  /** Tasks waiting for a thread now. */
  get queued(): number {
    return this.piscina.queueSize;
  }

  /**
   * Runs a task in a worker. Rejects with AppError `service_busy` (503) when the queue is
   * full, `compute_time_limit` when it ran past the limit; with `client_closed` when
   * `cancel` fired (the client went away).
   */
  async run<K extends TaskName>(name: K, input: TaskTable[K]['input'], cancel?: AbortSignal): Promise<TaskTable[K]['result']> {
    const timeLimit = new AbortController();
    let timer: NodeJS.Timeout | undefined;
    // The clock starts when a worker takes the task: waiting for a thread (bounded by
    // the queue) and a replaced worker's start-up do not count against it.
    const { port1: started, port2: startedInWorker } = new MessageChannel();
    started.once('message', () => {
      timer = setTimeout(() => timeLimit.abort(), this.timeLimitMs);
    });
    started.unref();
    const signals = cancel ? [timeLimit.signal, cancel] : [timeLimit.signal];
    try {
      const message = { name, input } as TaskMessage;
      const task = { message, started: startedInWorker };
      return (await this.piscina.run(task, { signal: AbortSignal.any(signals), transferList: [startedInWorker] })) as TaskTable[K]['result'];
    } catch (error) {
      if (timeLimit.signal.aborted) {
        throw new AppError('compute_time_limit', {
          message:
            `The computation took longer than this service's limit of ${formatSeconds(this.timeLimitMs)} and was stopped; nothing was stored. ` +
            'Send a shorter line or fewer shots, or ask whoever runs the service to raise ARCLINE_TIME_LIMIT_MS.',
        });
      }
      if (cancel?.aborted) throw new AppError('client_closed');
      if (this.closing) throw new AppError('service_busy', { message: 'The service is shutting down; try again in a moment.' });
      if (isQueueFull(error)) throw new AppError('service_busy');
      throw error;
    } finally {
      clearTimeout(timer);
      started.close();
    }
  }

  /** Stops every worker at once (running tasks are abandoned). */
  async close(): Promise<void> {
    this.closing ??= this.piscina.destroy();
    await this.closing;
  }
}

/** Piscina's refusals when no thread is free and no queue place is left. */
function isQueueFull(error: unknown): boolean {
  return error instanceof Error && /queue is at limit|no task queue available/i.test(error.message);
}

function formatSeconds(ms: number): string {
  return ms % 1000 === 0 ? `${ms / 1000} s` : `${(ms / 1000).toFixed(1)} s`;
}
