import { regionDescriptors } from '@shared/regions';
import type { RegionGeometry } from './common';
import { clippedDiamondVolume, conformalMeasure, diamondProfile, poincareFactor, type LightConeBox } from './conformal';

/**
 * The causal diamond of the Poincaré patch of 2D de Sitter, ds² = η⁻² (−dη² + dx²) in units of
 * ℓ = 1/H, between the tips (η₀, 0) ≺ (η₁, 0), η₀ < η₁ < 0: the square u = η + x, v = η − x ∈ (η₀, η₁).
 * With dη dx = ½ du dv and η = (u + v)/2 its volume is 2 ∫∫ du dv/(u + v)² = 2 ln(η_L η_R/(η₀ η₁)),
 * η_L = η_R = (η₀ + η₁)/2 the time of its side corners (server/engine/README.md §17). The order is the
 * flat order of (η, x).
 */
export const deSitterDiamond2dGeometry: RegionGeometry<'deSitterDiamond2d'> = {
  kind: 'deSitterDiamond2d',
  make(spec) {
    const { etaPast: e0, etaFuture: e1 } = spec;
    if (!(e0 < e1 && e1 < 0)) throw new RangeError('the tips must satisfy η₀ < η₁ < 0');
    const box: LightConeBox = { u0: e0, u1: e1, v0: e0, v1: e1 };
    const corner = (e0 + e1) / 2;
    const half = (e1 - e0) / 2;
    return {
      spec,
      dimension: regionDescriptors.deSitterDiamond2d.dimension,
      volume: 2 * Math.log((corner * corner) / (e0 * e1)),
      contains(e) {
        const u = e[0] + e[1];
        const v = e[0] - e[1];
        return u > e0 && u < e1 && v > e0 && v < e1;
      },
      insideMargin(e) {
        const u = e[0] + e[1];
        const v = e[0] - e[1];
        return Math.min(u - e0, e1 - u, v - e0, e1 - v);
      },
      boundingBox: { min: [e0, -half], max: [e1, half] },
      measure: conformalMeasure(diamondProfile(poincareFactor, box), '1/η²'),
      subDiamondVolume: (past, future) => clippedDiamondVolume(poincareFactor, past, future, { box, from: e0, to: e1 }),
    };
  },
};
