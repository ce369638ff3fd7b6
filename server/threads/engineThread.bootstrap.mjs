// Entry of the engine worker_thread. A thread starts without the parent's TypeScript loader when the
// parent runs under vitest (and tsx's hooks are not guaranteed to reach threads), so it loads the
// TypeScript body through tsx's own import API.
// `workerData.body` names another thread body (a file URL) for tasks other than a vacuum run.
import { workerData } from 'node:worker_threads';
import { tsImport } from 'tsx/esm/api';

await tsImport(workerData?.body ?? './engineThread.worker.ts', import.meta.url);
