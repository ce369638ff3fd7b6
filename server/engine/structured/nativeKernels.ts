import type { LinearAlgebraBackend } from '../linalg/backend';
import { nativeBackendStatus } from '../linalg/nativeBackend';

/**
 * The structured engine's own native kernels (native/src/structured.cc, part of the tacet_linalg
 * addon): Δ on a block of vectors by two dominance sweeps, and the products of block Gram–Schmidt with
 * a basis stored in row blocks as float32 or float64, every sum accumulated in float64. Each has a
 * JavaScript twin (dominance2d.ts, basis.ts) that the tests compare it with.
 */
export interface StructuredKernels {
  structuredApplyBlock(
    byU: Int32Array,
    ranks: Int32Array,
    groupStart: Int32Array,
    vRanks: number,
    c: number,
    width: number,
    input: Float64Array,
    output: Float64Array,
  ): void;
  /** out (m × width) += Vᵀ W, V rows × m column-major, W rows [wOffset, +rows) of columns ldw apart */
  basisProject(rows: number, m: number, width: number, v: Float32Array | Float64Array, w: Float64Array, ldw: number, wOffset: number, out: Float64Array): void;
  /** W = beta·W + alpha·V C */
  basisUpdate(
    rows: number,
    m: number,
    width: number,
    v: Float32Array | Float64Array,
    coefficients: Float64Array,
    w: Float64Array,
    ldw: number,
    wOffset: number,
    alpha: number,
    beta: number,
  ): void;
  /** out = V C (dgemm on float64 tiles of V) */
  basisCombine(rows: number, m: number, outputs: number, v: Float32Array | Float64Array, coefficients: Float64Array, out: Float64Array, ldo: number, oOffset: number): void;
  /** W ← W R⁻¹, W n × width column-major, R upper triangular */
  solveUpperRight(n: number, width: number, w: Float64Array, r: Float64Array): void;
}

const names = ['structuredApplyBlock', 'basisProject', 'basisUpdate', 'basisCombine', 'solveUpperRight'] as const;

/** The kernels when the native backend serves and its addon carries them (an older build may not). */
export function structuredKernelsFor(backend: LinearAlgebraBackend | null | undefined): StructuredKernels | null {
  if (!backend || backend.name !== 'native') return null;
  const exports = nativeBackendStatus().exports;
  if (!exports || !names.every((name) => typeof exports[name] === 'function')) return null;
  return exports as unknown as StructuredKernels;
}
