import { regionDescriptors } from '@shared/regions';
import type { RegionGeometry } from './common';
import { clippedDiamondVolume, conformalMeasure, diamondProfile, globalDeSitterFactor, areStaticPatchTips, type LightConeBox } from './conformal';

const HALF_PI = Math.PI / 2;

/**
 * ∫₀^s 2(π/2 − T) sec²T dT = 2[(π/2 − s) tan s − ln cos s]: the volume of the static patch between
 * T = 0 and T = s ≥ 0 (by parts, ∫ (π/2 − T) sec²T = (π/2 − T) tan T + ∫ tan T).
 */
const staticVolumeFromZero = (s: number) => 2 * ((HALF_PI - s) * Math.tan(s) - Math.log(Math.cos(s)));

/**
 * The static patch of the observer at θ = 0 in global 2D de Sitter (units of ℓ = 1/H): the diamond
 * |θ| < π/2 − |T| between the horizon tips (∓π/2, 0) on the conformal boundary — the square
 * u = T + θ, v = T − θ ∈ (−π/2, π/2) — cut to T ∈ (T₀, T₁). Its volume, with the cross-section
 * 2(π/2 − |T|) and √−g = sec²T, is V(T₁) − V(T₀) for the odd function V(T) = sign(T)·2[(π/2 − |T|) tan|T|
 * − ln cos T] (server/engine/README.md §17), which grows without bound as T → ±π/2. θ is not periodic
 * here: the patch spans less than π round the circle, so no second image of a point enters a light cone
 * and the flat order of (T, θ) is that of global de Sitter.
 */
export const deSitterStaticPatch2dGeometry: RegionGeometry<'deSitterStaticPatch2d'> = {
  kind: 'deSitterStaticPatch2d',
  make(spec) {
    const { conformalTimeMin: t0, conformalTimeMax: t1 } = spec;
    if (!(t1 > t0 && t0 > -HALF_PI && t1 < HALF_PI)) throw new RangeError('conformal times must satisfy −π/2 < T₀ < T₁ < π/2');
    const box: LightConeBox = { u0: -HALF_PI, u1: HALF_PI, v0: -HALF_PI, v1: HALF_PI };
    const widest = HALF_PI - (t0 < 0 && t1 > 0 ? 0 : Math.min(Math.abs(t0), Math.abs(t1)));
    const signedVolume = (t: number) => Math.sign(t) * staticVolumeFromZero(Math.abs(t));
    return {
      spec,
      dimension: regionDescriptors.deSitterStaticPatch2d.dimension,
      volume: signedVolume(t1) - signedVolume(t0),
      contains: (e) => e[0] > t0 && e[0] < t1 && Math.abs(e[1]) < HALF_PI - Math.abs(e[0]),
      insideMargin: (e) => Math.min(e[0] - t0, t1 - e[0], HALF_PI - Math.abs(e[0]) - Math.abs(e[1])),
      boundingBox: { min: [t0, -widest], max: [t1, widest] },
      measure: conformalMeasure(diamondProfile(globalDeSitterFactor, box, t0, t1), 'sec²T'),
      subDiamondVolume: (past, future) => clippedDiamondVolume(globalDeSitterFactor, past, future, { box, from: t0, to: t1 }),
      isHorizonDiamond: (past, future, slack) => areStaticPatchTips(past, future, slack, Math.abs),
    };
  },
};
