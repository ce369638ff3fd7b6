import { regionDescriptors } from '@shared/regions';
import { separationX, type RegionGeometry } from './common';
import { clippedDiamondVolume, conformalMeasure, globalDeSitterFactor, slabProfile, areStaticPatchTips } from './conformal';

const PERIOD = 2 * Math.PI;

/**
 * The slab T ∈ (T₀, T₁) of global 2D de Sitter, ds² = sec²T (−dT² + dθ²) in units of ℓ = 1/H, with θ
 * periodic (period 2π, stored in [−π, π)). Volume ∫ 2π sec²T dT = 2π (tan T₁ − tan T₀)
 * (server/engine/README.md §17). The order is the flat order of (T, θ) through the images of θ, as on the
 * cylinder; since T₁ − T₀ < π < 2π at most one image of a point lies in the past of another, so the
 * massless K = ½Cᵀ of the conformally invariant 2D field holds with image counts of 1.
 */
export const deSitterSlab2dGeometry: RegionGeometry<'deSitterSlab2d'> = {
  kind: 'deSitterSlab2d',
  make(spec) {
    const { conformalTimeMin: t0, conformalTimeMax: t1 } = spec;
    if (!(t1 > t0 && t0 > -Math.PI / 2 && t1 < Math.PI / 2)) throw new RangeError('conformal times must satisfy −π/2 < T₀ < T₁ < π/2');
    const profile = slabProfile(globalDeSitterFactor, t0, t1, -Math.PI, Math.PI);
    const wrap = (dx: number) => separationX(dx, PERIOD);
    return {
      spec,
      dimension: regionDescriptors.deSitterSlab2d.dimension,
      volume: PERIOD * globalDeSitterFactor.mass(t0, t1),
      periodX: PERIOD,
      contains: (e) => e[0] > t0 && e[0] < t1 && e[1] >= -Math.PI && e[1] < Math.PI,
      // θ counts modulo 2π, as on the cylinder
      insideMargin: (e) => Math.min(e[0] - t0, t1 - e[0]),
      boundingBox: { min: [t0, -Math.PI], max: [t1, Math.PI] },
      measure: conformalMeasure(profile, 'sec²T'),
      subDiamondVolume(past, future) {
        // the diamond towards the image of the future tip nearest the past tip (the one the order uses)
        const dx = future[1] - past[1];
        const shift = dx - Math.round(dx / PERIOD) * PERIOD;
        return clippedDiamondVolume(globalDeSitterFactor, past, [future[0], past[1] + shift], { from: t0, to: t1 });
      },
      isHorizonDiamond: (past, future, slack) => areStaticPatchTips(past, future, slack, wrap),
    };
  },
};
