/**
 * Flat-array kernels on a basis kept as separate columns (each a Float64Array of the same length).
 * Every routine works on a row range [begin, end) so that the rows can be split between threads; all
 * inner loops run over contiguous memory.
 */

const ROW_BLOCK = 256;

/**
 * out[c][i] = Σ_j basis[columns[j]][i] · coefficients[j + c·columns.length] for output columns c < outputs,
 * rows [begin, end). Blocked over rows (the block of every basis column stays in cache while four output
 * columns are accumulated), so the basis is streamed from memory about once per four outputs.
 */
export function combineColumns(
  basis: (Float32Array | Float64Array)[],
  columns: Int32Array,
  coefficients: Float64Array,
  outputs: number,
  out: Float64Array[],
  begin: number,
  end: number,
): void {
  const m = columns.length;
  const acc0 = new Float64Array(ROW_BLOCK);
  const acc1 = new Float64Array(ROW_BLOCK);
  const acc2 = new Float64Array(ROW_BLOCK);
  const acc3 = new Float64Array(ROW_BLOCK);
  for (let r0 = begin; r0 < end; r0 += ROW_BLOCK) {
    const len = Math.min(ROW_BLOCK, end - r0);
    for (let c = 0; c < outputs; c += 4) {
      const group = Math.min(4, outputs - c);
      acc0.fill(0);
      acc1.fill(0);
      acc2.fill(0);
      acc3.fill(0);
      const y0 = c * m;
      for (let j = 0; j < m; j++) {
        const v = basis[columns[j]];
        const c0 = coefficients[y0 + j];
        const c1 = group > 1 ? coefficients[y0 + m + j] : 0;
        const c2 = group > 2 ? coefficients[y0 + 2 * m + j] : 0;
        const c3 = group > 3 ? coefficients[y0 + 3 * m + j] : 0;
        for (let i = 0; i < len; i++) {
          const x = v[r0 + i];
          acc0[i] += c0 * x;
          acc1[i] += c1 * x;
          acc2[i] += c2 * x;
          acc3[i] += c3 * x;
        }
      }
      const accs = [acc0, acc1, acc2, acc3];
      for (let g = 0; g < group; g++) out[c + g].set(accs[g].subarray(0, len), r0);
    }
  }
}

/**
 * Upper triangle (and mirror) of G = FᵀF for the columns of F restricted to the listed rows:
 * G[a + b·k] = Σ_r F[a][rows[r]]·F[b][rows[r]], accumulated into `gram` (k × k, column-major).
 */
export function gatheredGram(columns: Float64Array[], rows: Int32Array, gram: Float64Array): void {
  const k = columns.length;
  const n = rows.length;
  const block = 512;
  const gathered = Array.from({ length: k }, () => new Float64Array(block));
  for (let r0 = 0; r0 < n; r0 += block) {
    const len = Math.min(block, n - r0);
    for (let a = 0; a < k; a++) {
      const src = columns[a];
      const dst = gathered[a];
      for (let i = 0; i < len; i++) dst[i] = src[rows[r0 + i]];
    }
    for (let b = 0; b < k; b++) {
      const fb = gathered[b];
      for (let a = 0; a <= b; a++) {
        const fa = gathered[a];
        let s0 = 0;
        let s1 = 0;
        let i = 0;
        for (; i + 1 < len; i += 2) {
          s0 += fa[i] * fb[i];
          s1 += fa[i + 1] * fb[i + 1];
        }
        if (i < len) s0 += fa[i] * fb[i];
        gram[a + b * k] += s0 + s1;
      }
    }
  }
  for (let b = 0; b < k; b++) for (let a = 0; a < b; a++) gram[b + a * k] = gram[a + b * k];
}
