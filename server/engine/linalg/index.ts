import type { BackendName, LinearAlgebraBackend } from './backend';
import { mlMatrixBackend } from './mlMatrixBackend';
import { nativeBackendStatus } from './nativeBackend';

export type { DenseMatrix, LinearAlgebraBackend, BackendName } from './backend';
export { denseMatrix } from './mlMatrixBackend';

export type BackendPreference = 'auto' | 'native' | 'ml-matrix';

/** Which backend 'auto' picks in this process, and why native is not used when it is not. */
export interface BackendSelection {
  name: BackendName;
  /** null when native serves; otherwise why not (forced by TACET_LINALG, or the load failure) */
  nativeUnavailableReason: string | null;
  /** the BLAS build behind the native backend, when it loaded */
  blasConfig: string | null;
}

/**
 * 'auto' = native when the addon loads, else ml-matrix. TACET_LINALG=ml-matrix forces the fallback for
 * 'auto'; TACET_LINALG=native makes 'auto' fail loudly instead of falling back (for CI).
 */
export function backendSelection(): BackendSelection {
  const status = nativeBackendStatus();
  const forced = process.env.TACET_LINALG;
  if (forced === 'ml-matrix') {
    return { name: 'ml-matrix', nativeUnavailableReason: 'TACET_LINALG=ml-matrix forces the JavaScript backend', blasConfig: status.blasConfig };
  }
  if (forced !== undefined && forced !== '' && forced !== 'native' && forced !== 'auto') {
    throw new Error(`TACET_LINALG must be auto, native or ml-matrix, got "${forced}"`);
  }
  if (status.backend) return { name: 'native', nativeUnavailableReason: null, blasConfig: status.blasConfig };
  if (forced === 'native') throw new Error(`TACET_LINALG=native but ${status.reason}`);
  return { name: 'ml-matrix', nativeUnavailableReason: status.reason, blasConfig: null };
}

/** The dense linear-algebra backend for a preference; 'auto' picks the best one available. */
export function getBackend(preference: BackendPreference = 'auto'): LinearAlgebraBackend {
  if (preference === 'ml-matrix') return mlMatrixBackend;
  if (preference === 'native') {
    const status = nativeBackendStatus();
    if (!status.backend) throw new Error(`the native linear-algebra backend is not available: ${status.reason}`);
    return status.backend;
  }
  return backendSelection().name === 'native' ? (nativeBackendStatus().backend as LinearAlgebraBackend) : mlMatrixBackend;
}
