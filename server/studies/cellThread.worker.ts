import { isMainThread, parentPort, workerData } from 'node:worker_threads';
import { CancelledError, EngineInputError } from '../engine/index';
import type { EngineThreadMessage } from '../threads/engineThread';
import { computeStudyCell, type StudyCellSpec } from './cell';

/**
 * Thread body of one study cell (started through runInThread in server/threads/engineThread.ts): the
 * stages are synchronous, so they run here while the worker's event loop renews BullMQ locks and
 * polls for cancellation.
 */
if (isMainThread || !parentPort) throw new Error('cellThread.worker.ts must run inside a worker_thread');

const port = parentPort;
const { spec, cancelFlag } = workerData as { spec: StudyCellSpec; cancelFlag: SharedArrayBuffer };
const flag = new Int32Array(cancelFlag);
const post = (message: EngineThreadMessage | { type: 'result'; result: unknown }, transfer: ArrayBuffer[] = []) => port.postMessage(message, transfer);

try {
  const result = await computeStudyCell(spec, {
    onProgress: (stage, fraction) => post({ type: 'progress', stage, fraction }),
    shouldCancel: () => Atomics.load(flag, 0) !== 0,
  });
  post({ type: 'result', result }, [result.eigenvalues.buffer as ArrayBuffer]);
} catch (error) {
  const kind = error instanceof CancelledError ? 'cancelled' : error instanceof EngineInputError ? 'input' : 'other';
  const stage = error instanceof CancelledError ? error.stage : null;
  post({ type: 'error', kind, message: error instanceof Error ? error.message : String(error), stage });
}
