import { regionDescriptors } from '@shared/regions';
import { continuumDiamondSpectrum } from '../continuum';
import type { RegionGeometry } from './common';

const SQRT1_2 = Math.SQRT1_2;

/**
 * 2D causal diamond between tips p ≺ q: a square in light-cone coordinates u = (t+x)/√2, v = (t−x)/√2,
 * volume Δu Δv = τ²/2 (server/engine/README.md §2).
 */
export const diamond2dGeometry: RegionGeometry<'diamond2d'> = {
  kind: 'diamond2d',
  make(spec) {
    const half = spec.properTime !== undefined ? spec.properTime / 2 : 0;
    const past = spec.past ?? { t: -half, x: 0 };
    const future = spec.future ?? { t: half, x: 0 };
    const u0 = (past.t + past.x) * SQRT1_2;
    const v0 = (past.t - past.x) * SQRT1_2;
    const u1 = (future.t + future.x) * SQRT1_2;
    const v1 = (future.t - future.x) * SQRT1_2;
    if (!(u1 > u0 && v1 > v0)) throw new RangeError('diamond tips must be timelike separated, future after past');
    return {
      spec,
      dimension: regionDescriptors.diamond2d.dimension,
      volume: (u1 - u0) * (v1 - v0),
      contains(e) {
        const u = (e[0] + e[1]) * SQRT1_2;
        const v = (e[0] - e[1]) * SQRT1_2;
        return u > u0 && u < u1 && v > v0 && v < v1;
      },
      insideMargin(e) {
        const u = e[0] + e[1];
        const v = e[0] - e[1];
        return Math.min(u - (past.t + past.x), future.t + future.x - u, v - (past.t - past.x), future.t - future.x - v);
      },
      boundingBox: {
        min: [past.t, Math.min((u0 - v1) * SQRT1_2, (u0 - v0) * SQRT1_2)],
        max: [future.t, Math.max((u1 - v0) * SQRT1_2, (u1 - v1) * SQRT1_2)],
      },
    };
  },
  // the spectrum of a 2D diamond depends on N alone (it is Lorentz and scale invariant), tips or proper time
  continuumSpectrum: continuumDiamondSpectrum,
};
