import { regionDescriptors } from '@shared/regions';
import type { RegionGeometry } from './common';

/** 4D causal diamond with tips (±τ/2, 0⃗): |x⃗| < τ/2 − |t|, volume πτ⁴/24 (server/engine/README.md §2). */
export const diamond4dGeometry: RegionGeometry<'diamond4d'> = {
  kind: 'diamond4d',
  make(spec) {
    const h = spec.properTime / 2;
    return {
      spec,
      dimension: regionDescriptors.diamond4d.dimension,
      volume: (Math.PI * spec.properTime ** 4) / 24,
      contains(e) {
        const r = Math.sqrt(e[1] * e[1] + e[2] * e[2] + e[3] * e[3]);
        return r < h - Math.abs(e[0]);
      },
      insideMargin: (e) => h - Math.abs(e[0]) - Math.hypot(e[1], e[2], e[3]),
      boundingBox: { min: [-h, -h, -h, -h], max: [h, h, h, h] },
    };
  },
};
