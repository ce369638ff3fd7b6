import { readFileSync } from 'node:fs';

/**
 * The diamond300 reference: 300 points (t, x) in the 2D diamond |t| + |x| ≤ √2 and what numpy 1.24.2 with
 * LAPACK computed on exactly those points (fixtures/README.md; server/engine/README.md §13).
 */
export function diamond300Points(): Float64Array {
  return Float64Array.from(
    readFileSync(new URL('../../fixtures/diamond300.csv', import.meta.url), 'utf8')
      .trim()
      .split('\n')
      .slice(1)
      .flatMap((line) => line.split(',').map(Number)),
  );
}

/** fixtures/diamond300.ref.json, parsed; callers name the fields they read. */
export function diamond300Reference<T = Record<string, unknown>>(): T {
  return JSON.parse(readFileSync(new URL('../../fixtures/diamond300.ref.json', import.meta.url), 'utf8')) as T;
}
