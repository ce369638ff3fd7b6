import { restrictedEntropy, type EntropyResult } from '../entropy';
import type { RestrictedCut } from '@shared/vacuum';
import type { DenseMatrix, LinearAlgebraBackend } from '../linalg/backend';
import { denseMatrix, getBackend } from '../linalg';
import type { FactoredSjState } from './factoredState';
import { gatheredGram } from './kernels';

/** Directions of the restricted factors below this share of the largest Gram eigenvalue carry nothing. */
const NULL_DIRECTION_RELATIVE = 1e-14;

/**
 * Sorkin's spacetime entanglement entropy of a subregion from the factored state (Sorkin 2012,
 * arXiv:1205.2953; Saravani–Sorkin–Yazdi 2014; double truncation Sorkin–Yazdi 2018, CQG 35 074004).
 *
 * On the n rows of O the state is F = [a_1|_O, b_1|_O, …] (n × 2k): X = Re W_c|_O = F D Fᵀ with
 * D = ½ diag(σ_1, σ_1, …) and A = Δ_c|_O = F J Fᵀ with J block diagonal [[0, −σ], [σ, 0]]; both have
 * rank ≤ 2k. With the Gram matrix G = FᵀF = V Λ Vᵀ, the columns of Q = F V Λ^(−½) are an orthonormal basis
 * of their range and QᵀF = R = Λ^½ Vᵀ, so X and A act on that range as the 2k × 2k matrices R D Rᵀ and
 * R J Rᵀ — no division by Λ is ever done. The dense engine's inner routine (entropy.ts restrictedEntropy:
 * restricted modes of AᵀA above the restricted cut, B = X̃^½ Ã⁻¹ X̃^½, S from the κ of BᵀB) then runs on those small matrices, since
 * S and the nonzero spectrum of A are unchanged by the orthonormal change of basis. Cost O(n k²) for G
 * and O(k³) for the rest.
 */
export function factoredEntropy(
  state: FactoredSjState,
  elements: ArrayLike<number>,
  options: { doubleTruncation?: boolean; restrictedCut?: RestrictedCut | null; backend?: LinearAlgebraBackend } = {},
): EntropyResult {
  const backend = options.backend ?? getBackend();
  const doubleTruncation = options.doubleTruncation === true;
  const n = elements.length;
  if (n < 2) throw new RangeError(`the subregion holds ${n} element(s); the entropy needs at least 2`);
  const rows = Int32Array.from(elements);
  for (const r of rows) if (!(r >= 0 && r < state.size)) throw new RangeError(`subregion element ${r} does not exist (the causal set has ${state.size} elements)`);
  const k = state.sigma.length;
  const width = 2 * k;
  const columns: Float64Array[] = [];
  for (let i = 0; i < k; i++) columns.push(state.a[i], state.b[i]);
  let gram: DenseMatrix;
  if (backend.name === 'native') {
    // gathering the n × 2k rows once lets BLAS dsyrk do the O(n k²) product
    const gathered = denseMatrix(n, width);
    for (let c = 0; c < width; c++) {
      const column = columns[c];
      const offset = c * n;
      for (let i = 0; i < n; i++) gathered.data[offset + i] = column[rows[i]];
    }
    gram = backend.gram(gathered);
  } else {
    gram = denseMatrix(width, width);
    gatheredGram(columns, rows, gram.data);
  }
  const gramEig = backend.symmetricEigen(gram);
  const top = gramEig.values[width - 1] ?? 0;
  const kept: number[] = [];
  for (let c = width - 1; c >= 0; c--) if (gramEig.values[c] > NULL_DIRECTION_RELATIVE * top) kept.push(c);
  const r = kept.length;
  // R = Λ^½ Vᵀ restricted to the kept directions (r × 2k)
  const reduced = denseMatrix(r, width);
  const vectors = (gramEig.vectors as DenseMatrix).data;
  for (let p = 0; p < r; p++) {
    const c = kept[p];
    const root = Math.sqrt(gramEig.values[c]);
    for (let q = 0; q < width; q++) reduced.data[p + q * r] = root * vectors[q + c * width];
  }
  // R D and R J (columns 2i ↔ a_i, 2i+1 ↔ b_i)
  const rd = denseMatrix(r, width);
  const rj = denseMatrix(r, width);
  for (let i = 0; i < k; i++) {
    const s = state.sigma[i];
    const ca = 2 * i * r;
    const cb = (2 * i + 1) * r;
    for (let p = 0; p < r; p++) {
      rd.data[ca + p] = 0.5 * s * reduced.data[ca + p];
      rd.data[cb + p] = 0.5 * s * reduced.data[cb + p];
      // (R J)[:, a_i] = σ R[:, b_i], (R J)[:, b_i] = −σ R[:, a_i]
      rj.data[ca + p] = s * reduced.data[cb + p];
      rj.data[cb + p] = -s * reduced.data[ca + p];
    }
  }
  const x = backend.multiply(rd, reduced, { transposeB: true });
  const a = backend.multiply(rj, reduced, { transposeB: true });
  return restrictedEntropy(x, a, { n, doubleTruncation, restrictedCut: options.restrictedCut }, backend);
}
