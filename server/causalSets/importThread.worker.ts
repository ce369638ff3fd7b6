import { isMainThread, parentPort, workerData } from 'node:worker_threads';
import type { CausalSetMetadata } from '@shared/causalSets';
import type { EngineThreadMessage } from '../threads/engineThread';
import { importValues, type ImportThreadOutcome } from './importFile';
import { CausalSetFileError, type SizeLimit } from './parse';

/**
 * Thread body of a large upload (started through runInThread in server/threads/engineThread.ts from
 * importValuesOffThread): parses and packs the file while the API's event loop keeps answering.
 */
if (isMainThread || !parentPort) throw new Error('importThread.worker.ts must run inside a worker_thread');

const port = parentPort;
const { metadata, bytes, limit } = workerData as { metadata: CausalSetMetadata; bytes: Uint8Array; limit: SizeLimit };
const post = (message: EngineThreadMessage | { type: 'result'; result: ImportThreadOutcome }) => port.postMessage(message);

try {
  post({ type: 'result', result: { ok: true, values: importValues(metadata, bytes, limit) } });
} catch (error) {
  if (error instanceof CausalSetFileError) {
    post({ type: 'result', result: { ok: false, code: error.code, problems: error.problems, more: error.more } });
  } else {
    post({ type: 'error', kind: 'other', message: error instanceof Error ? error.message : String(error), stage: null });
  }
}
