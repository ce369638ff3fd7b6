import { regionDescriptors } from '@shared/regions';
import { separationX, type RegionGeometry } from './common';

/**
 * On the cylinder x ~ x + L: the number of images (t_i, x_i + nL), n ∈ ℤ, in the causal past of
 * (t_j, x_j) — the multiplicity of the massless retarded Green function on the cylinder, by the method
 * of images for the 2D wave equation: G_R = ½ · #{n : y + nL ≺ x}. Zero unless i ≺ j; one while the
 * past light cone of j does not wrap round the cylinder onto a second image.
 *
 * With d = the shortest separation round the cylinder (the one `causalMatrix` tests), the image
 * separations are d + kL (k ≥ 0) and kL − d (k ≥ 1), so the count is
 * ⌈(Δt − d)/L⌉ + ⌈(Δt + d)/L⌉ − 1 for Δt > d, and 0 otherwise — O(1), and ≥ 1 exactly when C says i ≺ j.
 */
export function imageCount(points: ArrayLike<number>, i: number, j: number, periodX: number): number {
  const dt = points[2 * j] - points[2 * i];
  const d = separationX(points[2 * j + 1] - points[2 * i + 1], periodX);
  if (!(dt > 0 && dt > d)) return 0;
  return Math.ceil((dt - d) / periodX) + Math.ceil((dt + d) / periodX) - 1;
}

/**
 * Causal diamond on the cylinder x ~ x + L between (−T/2, 0) and (T/2, 0): at height s above the past
 * tip its cross-section has length min(2s, 2(T−s), L), so the volume is T²/2 when T ≤ L and
 * T²/2 − (T−L)²/2 when the two light cones wrap around (T > L) (server/engine/README.md §2).
 * Coordinates x lie in [−L/2, L/2). For T > L some pairs are related through two or more images; the
 * order stays 0/1, but the Green function counts the images (`imageCount`, green.ts `masslessGreenRelation`).
 */
export const cylinder2dGeometry: RegionGeometry<'cylinder2d'> = {
  kind: 'cylinder2d',
  make(spec) {
    const T = spec.properTime;
    const L = spec.circumference;
    const volume = T <= L ? (T * T) / 2 : (T * T) / 2 - ((T - L) * (T - L)) / 2;
    const halfWidth = Math.min(T / 2, L / 2);
    return {
      spec,
      dimension: regionDescriptors.cylinder2d.dimension,
      volume,
      periodX: L,
      contains(e) {
        const t = e[0];
        if (e[1] < -L / 2 || e[1] >= L / 2) return false;
        const d = separationX(e[1], L);
        return t + T / 2 > d && T / 2 - t > d;
      },
      // x counts modulo the circumference here, so x = L/2 + a is the event at −L/2 + a
      insideMargin(e) {
        const d = separationX(e[1], L);
        return Math.min(e[0] + T / 2 - d, T / 2 - e[0] - d);
      },
      boundingBox: { min: [-T / 2, -halfWidth], max: [T / 2, halfWidth] },
    };
  },
};
