import { Worker } from 'node:worker_threads';
import type { VacuumStage } from '@shared/vacuum';
import { CancelledError, EngineInputError, type VacuumRequest, type VacuumResult } from '../engine/index';

/** What the thread receives: the request (no backend object, the thread picks its own) and the cancel flag. */
export interface EngineThreadData {
  request: Omit<VacuumRequest, 'backend' | 'keepState'>;
  /** Int32 slot 0: non-zero once cancellation is asked */
  cancelFlag: SharedArrayBuffer;
}

export type EngineThreadMessage =
  | { type: 'progress'; stage: VacuumStage; fraction: number }
  | { type: 'result'; result: VacuumResult }
  | { type: 'error'; kind: 'cancelled' | 'input' | 'other'; message: string; stage: VacuumStage | null };

export interface EngineThreadOptions {
  onProgress?(stage: VacuumStage, fraction: number): void;
  /**
   * Polled every `pollMs` while the thread works. 'cancel' raises the flag the engine checks between
   * stages (and terminates the thread if it has not stopped after `cancelGraceMs`); 'abandon' (the run
   * is gone) terminates it at once.
   */
  poll?(): Promise<'continue' | 'cancel' | 'abandon'>;
  pollMs?: number;
  cancelGraceMs?: number;
}

/** The run was deleted while it computed: nothing is left to store. */
export class AbandonedError extends Error {
  override readonly name = 'AbandonedError';
}

const bootstrapUrl = new URL('./engineThread.bootstrap.mjs', import.meta.url);

/**
 * Runs computeVacuum in a worker_thread. Resolves with the engine's result; rejects with the engine's
 * EngineInputError or CancelledError rebuilt on this side, AbandonedError, or an Error for anything
 * else (including the thread dying, e.g. out of memory).
 */
export function runInEngineThread(request: EngineThreadData['request'], options: EngineThreadOptions = {}): Promise<VacuumResult> {
  return runInThread<VacuumResult>(null, { request }, options);
}

/**
 * The same mechanism for another synchronous engine task: `body` is the file URL of a thread module
 * that reads `workerData` (with `cancelFlag` added) and posts EngineThreadMessage-shaped messages;
 * null is the vacuum body. Used by the scaling-study cells (server/studies/cellThread.worker.ts).
 */
export function runInThread<T>(body: string | null, data: Record<string, unknown>, options: EngineThreadOptions = {}): Promise<T> {
  const { pollMs = 500, cancelGraceMs = 5_000 } = options;
  const cancelFlag = new SharedArrayBuffer(4);
  const flag = new Int32Array(cancelFlag);
  const thread = new Worker(bootstrapUrl, { workerData: { ...data, cancelFlag, ...(body ? { body } : {}) } });

  return new Promise<T>((resolve, reject) => {
    let settled = false;
    let pollTimer: NodeJS.Timeout | undefined;
    let graceTimer: NodeJS.Timeout | undefined;
    let cancelStage: VacuumStage = 'sprinkle';
    let polling = false;

    const finish = (outcome: { value: T } | { error: Error }) => {
      if (settled) return;
      settled = true;
      clearInterval(pollTimer);
      clearTimeout(graceTimer);
      if ('value' in outcome) resolve(outcome.value);
      else reject(outcome.error);
      void thread.terminate();
    };

    thread.on('message', (message: EngineThreadMessage | { type: 'result'; result: T }) => {
      if (message.type === 'progress') {
        cancelStage = message.stage;
        options.onProgress?.(message.stage, message.fraction);
      } else if (message.type === 'result') {
        finish({ value: message.result as T });
      } else if (message.kind === 'cancelled') {
        finish({ error: new CancelledError(message.stage ?? cancelStage) });
      } else if (message.kind === 'input') {
        finish({ error: new EngineInputError(message.message) });
      } else {
        finish({ error: new Error(message.message) });
      }
    });
    thread.on('error', (error) => finish({ error }));
    thread.on('exit', (code) => finish({ error: new Error(`the engine thread stopped unexpectedly (exit code ${code})`) }));

    if (options.poll) {
      const poll = options.poll;
      pollTimer = setInterval(() => {
        if (polling || settled) return;
        polling = true;
        poll()
          .then((verdict) => {
            if (settled) return;
            if (verdict === 'abandon') finish({ error: new AbandonedError('the run was deleted while it computed') });
            else if (verdict === 'cancel' && Atomics.load(flag, 0) === 0) {
              Atomics.store(flag, 0, 1);
              // A stage cannot be interrupted from inside; a long one is cut short by ending the thread.
              graceTimer = setTimeout(() => finish({ error: new CancelledError(cancelStage) }), cancelGraceMs);
            }
          })
          .catch(() => undefined)
          .finally(() => {
            polling = false;
          });
      }, pollMs);
    }
  });
}
