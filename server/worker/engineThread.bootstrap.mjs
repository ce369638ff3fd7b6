// Entry of the engine worker_thread. A thread starts without the parent's TypeScript loader when the
// parent runs under vitest (and tsx's hooks are not guaranteed to reach threads), so it loads the
// TypeScript body through tsx's own import API.
import { tsImport } from 'tsx/esm/api';

await tsImport('./engineThread.worker.ts', import.meta.url);
