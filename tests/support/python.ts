import { execFileSync, spawnSync } from 'node:child_process';

let cached: string | null | undefined;

/**
 * A python3 that can import numpy and scipy (the outside references of the engine tests): Debian's
 * /usr/bin/python3 first, then whatever python3 is on PATH. Null when none is usable.
 */
export function findPythonWithScipy(): string | null {
  if (cached !== undefined) return cached;
  cached = null;
  for (const candidate of ['/usr/bin/python3', 'python3']) {
    const probe = spawnSync(candidate, ['-c', 'import numpy, scipy.special'], { encoding: 'utf8' });
    if (probe.status === 0) {
      cached = candidate;
      break;
    }
  }
  return cached;
}

/**
 * Runs a python script with numpy/scipy, feeding `input` as JSON on stdin and parsing its stdout as
 * JSON. Throws (so the calling test fails, never skips) when no suitable python is installed.
 */
export function runPython<T>(script: string, input: unknown): T {
  const python = findPythonWithScipy();
  if (!python) {
    throw new Error('no python3 with numpy and scipy found (tried /usr/bin/python3 and python3): install python3-numpy python3-scipy');
  }
  const out = execFileSync(python, ['-c', script], { input: JSON.stringify(input), encoding: 'utf8', maxBuffer: 64 * 2 ** 20 });
  return JSON.parse(out) as T;
}
