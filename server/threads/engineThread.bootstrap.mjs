// Entry of the engine worker_thread. A thread starts without the parent's TypeScript loader when the
// parent runs under vitest (and tsx's hooks are not guaranteed to reach threads), so it loads the
// TypeScript body through tsx's own import API.
// `workerData.body` names another thread body (a file URL) for tasks other than a vacuum run.
// The project's tsconfig is named explicitly (tsx would look from the working directory) so that the
// `@shared/` imports resolve wherever the process was started.
import { fileURLToPath } from 'node:url';
import { workerData } from 'node:worker_threads';
import { tsImport } from 'tsx/esm/api';

await tsImport(workerData?.body ?? './engineThread.worker.ts', {
  parentURL: import.meta.url,
  tsconfig: fileURLToPath(new URL('../../tsconfig.json', import.meta.url)),
});
