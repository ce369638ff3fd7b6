import { spawnSync } from 'node:child_process';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { nativeBackendStatus } from '../../server/engine/linalg/nativeBackend';

/**
 * A cancelled run ends its engine thread with worker.terminate(), possibly in the middle of a LAPACK
 * call. When that call returns, the thread can no longer raise a JavaScript exception; the addon must
 * drop it instead of aborting the whole worker process (which it once did, with
 * "terminate called after throwing an instance of 'Napi::Error'").
 */
const native = nativeBackendStatus();

describe('native addon in a terminated worker thread', () => {
  it.runIf(native.backend)('terminating a thread mid-eigendecomposition leaves the process alive', () => {
    const addonPath = native.addonPath;
    const script = `
      const { Worker } = require('node:worker_threads');
      const thread = new Worker(${JSON.stringify(`
        const addon = require(${JSON.stringify(addonPath)});
        const n = 1200; const a = new Float64Array(n * n);
        for (let i = 0; i < n * n; i++) a[i] = Math.sin(i);
        require('node:worker_threads').parentPort.postMessage('started');
        addon.symmetricEigen(n, a, true);
      `)}, { eval: true });
      thread.on('message', () => setTimeout(() => thread.terminate().then(() => {
        const addon = require(${JSON.stringify(addonPath)});
        let message = '';
        try { addon.symmetricEigen(3, new Float64Array(4), true); } catch (error) { message = error.message; }
        console.log('alive after terminate; errors still reach JavaScript: ' + message);
      }), 50));
    `;
    const result = spawnSync(process.execPath, ['-e', script], { encoding: 'utf8', cwd: path.resolve(import.meta.dirname, '..', '..'), timeout: 60_000 });
    expect(result.stderr).not.toMatch(/terminate called/);
    expect(result.status).toBe(0);
    expect(result.stdout).toMatch(/alive after terminate; errors still reach JavaScript: .+/);
  });
});
