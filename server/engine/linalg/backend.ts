/**
 * The one small interface through which the engine does dense linear algebra.
 *
 * Two implementations: `mlMatrixBackend` (portable, pure JavaScript, the reference in tests) and a
 * native one bound to OpenBLAS/LAPACK (see DEVELOPERS.md). Every engine module that needs a
 * decomposition or a dense product asks for a backend instead of calling a library directly.
 *
 * Storage convention: every DenseMatrix is column-major — element (i, j) is `data[i + j * rows]` —
 * which is LAPACK's order, so the native path copies nothing.
 */
export interface DenseMatrix {
  rows: number;
  cols: number;
  /** column-major, length rows * cols */
  data: Float64Array;
}

export interface SymmetricEigenOptions {
  /** compute eigenvectors (default true) */
  vectors?: boolean;
  /** keep only eigenpairs whose eigenvalue is strictly greater than this */
  above?: number;
  /**
   * the caller no longer needs the input: a backend may use its storage as workspace (saving a copy
   * of N² entries) and leave it undefined
   */
  overwriteInput?: boolean;
}

export interface SymmetricEigenResult {
  /** eigenvalues in ascending order */
  values: Float64Array;
  /** rows × values.length, column k is the unit eigenvector of values[k]; null when vectors: false */
  vectors: DenseMatrix | null;
}

export interface TriangularSolveOptions {
  /** T is lower triangular (otherwise upper) */
  lower: boolean;
  /** the diagonal of T is taken as all ones and not read */
  unitDiagonal?: boolean;
  /** solve Tᵀ X = B instead of T X = B */
  transpose?: boolean;
}

/**
 * The normal form of a real antisymmetric A of even order n: A a_k = σ_k b_k and A b_k = −σ_k a_k with
 * orthonormal a_k, b_k, so both are eigenvectors of AᵀA for σ_k².
 */
export interface SkewSpectrumResult {
  /** the n/2 singular values σ_k of A (each is one twice), descending */
  sigma: Float64Array;
  /** n × n, column 2k is a_k and column 2k + 1 is b_k */
  vectors: DenseMatrix;
}

export type BackendName = 'native' | 'ml-matrix';

export interface LinearAlgebraBackend {
  readonly name: BackendName;
  /** Eigendecomposition of a real symmetric matrix; only its lower triangle is read. */
  symmetricEigen(a: DenseMatrix, options?: SymmetricEigenOptions): SymmetricEigenResult;
  /** C = op(A) · op(B) with op the identity or the transpose. */
  multiply(a: DenseMatrix, b: DenseMatrix, options?: { transposeA?: boolean; transposeB?: boolean }): DenseMatrix;
  /** C = Aᵀ A, returned with both triangles filled. */
  gram(a: DenseMatrix): DenseMatrix;
  /** X with T X = B (or Tᵀ X = B) for a triangular T, by substitution; never forms T⁻¹. */
  solveTriangular(t: DenseMatrix, b: DenseMatrix, options: TriangularSolveOptions): DenseMatrix;
  /**
   * The lower triangular L with A = L Lᵀ (upper part zero) of a symmetric positive definite A, or null
   * when A is not positive definite to working precision. Only the lower triangle is read.
   */
  cholesky(a: DenseMatrix): DenseMatrix | null;
  /**
   * Optional (native only): the normal form of a real antisymmetric A of even order, straight from A
   * (only its strict lower triangle is read) instead of the eigendecomposition of AᵀA. With
   * `overwriteInput` A's storage may be used as workspace and is left undefined.
   */
  skewSpectrum?(a: DenseMatrix, options?: { overwriteInput?: boolean }): SkewSpectrumResult;
}
