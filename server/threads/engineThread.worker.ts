import { isMainThread, parentPort, workerData } from 'node:worker_threads';
import { CancelledError, computeVacuum, EngineInputError, type VacuumRequest } from '../engine/index';
import { manifoldOfVacuum } from '../engine/manifoldLikeness';
import { makeRegion } from '../engine/regions';
import type { EngineThreadData, EngineThreadMessage } from './engineThread';

/**
 * Body of the engine thread: one computeVacuum per thread. The stages are synchronous, so they run
 * here and the worker's event loop stays free to renew BullMQ locks and poll for cancellation.
 */
if (isMainThread || !parentPort) throw new Error('engineThread.worker.ts must run inside a worker_thread');

const port = parentPort;
const { request, cancelFlag } = workerData as EngineThreadData;
const flag = new Int32Array(cancelFlag);
const post = (message: EngineThreadMessage, transfer: ArrayBuffer[] = []) => port.postMessage(message, transfer);

try {
  const result = await computeVacuum(request as VacuumRequest, {
    onProgress: (stage, fraction) => post({ type: 'progress', stage, fraction }),
    shouldCancel: () => Atomics.load(flag, 0) !== 0,
  });
  // the set's manifold-likeness beside the vacuum, for the run page (server/engine/README.md §16)
  result.manifold = manifoldOfVacuum(request.source as VacuumRequest['source'] & { causal?: Uint32Array; count?: number }, {
    points: result.points,
    dimension: result.dimension,
    N: result.N,
    periodX: result.region ? makeRegion(result.region).periodX : undefined,
  });
  const transfer = [result.points.buffer, result.eigenvalues.buffer] as ArrayBuffer[];
  if (result.entropy) transfer.push(result.entropy.generalizedEigenvalues.buffer as ArrayBuffer, result.entropy.elements.buffer as ArrayBuffer);
  post({ type: 'result', result }, [...new Set(transfer)]);
} catch (error) {
  const kind = error instanceof CancelledError ? 'cancelled' : error instanceof EngineInputError ? 'input' : 'other';
  const stage = error instanceof CancelledError ? error.stage : null;
  post({ type: 'error', kind, message: error instanceof Error ? error.message : String(error), stage });
}
