import { regionDescriptors } from '@shared/regions';
import { eventText, type RegionGeometry } from './common';

/** The 2D slab (rectangle) t ∈ (t₀, t₁), x ∈ (x₀, x₁), volume (t₁ − t₀)(x₁ − x₀) (server/engine/README.md §2). */
export const slab2dGeometry: RegionGeometry<'slab2d'> = {
  kind: 'slab2d',
  make(spec) {
    const margin = (e: ArrayLike<number>) => Math.min(e[0] - spec.tMin, spec.tMax - e[0], e[1] - spec.xMin, spec.xMax - e[1]);
    return {
      spec,
      dimension: regionDescriptors.slab2d.dimension,
      volume: (spec.tMax - spec.tMin) * (spec.xMax - spec.xMin),
      contains: (e) => e[0] > spec.tMin && e[0] < spec.tMax && e[1] > spec.xMin && e[1] < spec.xMax,
      insideMargin: margin,
      boundingBox: { min: [spec.tMin, spec.xMin], max: [spec.tMax, spec.xMax] },
      /**
       * A slab is not causally convex along x: a sub-diamond with its tips inside can still reach out at
       * its spatial corners. Such a sub-diamond is refused: the elements it would hold fill a diamond
       * clipped by the slab, whose entropy is not that of the diamond asked for (and whose size is not
       * the volume of the diamond a study plans with).
       */
      subDiamondIssue(past, future, slack) {
        // the diamond's spatial corners, from the light-cone coordinates u = t + x, v = t − x of its tips
        const corners = [
          [past[0] + past[1], future[0] - future[1]],
          [future[0] + future[1], past[0] - past[1]],
        ].map(([u, v]) => [(u + v) / 2, (u - v) / 2]);
        const out = corners.find((c) => margin(c) < -slack);
        return out
          ? `the sub-diamond reaches outside the slab at its corner ${eventText(out)}: a sub-diamond must lie wholly in the slab (a clipped diamond is not the diamond asked for)`
          : null;
      },
    };
  },
};
