import type { LinearAlgebraBackend } from './backend';
import { mlMatrixBackend } from './mlMatrixBackend';

export type { DenseMatrix, LinearAlgebraBackend, BackendName } from './backend';
export { denseMatrix } from './mlMatrixBackend';

export type BackendPreference = 'auto' | 'native' | 'ml-matrix';

/** The dense linear-algebra backend for a preference; 'auto' picks the best one available. */
export function getBackend(preference: BackendPreference = 'auto'): LinearAlgebraBackend {
  if (preference === 'native') throw new Error('the native linear-algebra backend is not available in this build');
  return mlMatrixBackend;
}
