import type { RegionKind, RegionSpec } from '@shared/regions';
import type { Region, RegionGeometry } from './common';
import { cylinder2dGeometry } from './cylinder2d';
import { deSitterDiamond2dGeometry } from './deSitterDiamond2d';
import { deSitterSlab2dGeometry } from './deSitterSlab2d';
import { deSitterStaticPatch2dGeometry } from './deSitterStaticPatch2d';
import { diamond2dGeometry } from './diamond2d';
import { diamond4dGeometry } from './diamond4d';
import { slab2dGeometry } from './slab2d';

/**
 * The engine's half of the region registry (shared/regions.ts holds the other): one geometry module per
 * kind, typed by kind so a kind without its geometry does not compile.
 */
export const regionGeometries: { readonly [K in RegionKind]: RegionGeometry<K> } = {
  diamond2d: diamond2dGeometry,
  cylinder2d: cylinder2dGeometry,
  slab2d: slab2dGeometry,
  diamond4d: diamond4dGeometry,
  deSitterSlab2d: deSitterSlab2dGeometry,
  deSitterDiamond2d: deSitterDiamond2dGeometry,
  deSitterStaticPatch2d: deSitterStaticPatch2dGeometry,
};

export type { Region, RegionGeometry, RegionMeasure, UniformSource } from './common';
export { eventText, numberText, precedes, separationX } from './common';
export { imageCount } from './cylinder2d';

export function regionGeometry<K extends RegionKind>(kind: K): RegionGeometry<K> {
  return regionGeometries[kind];
}

/** The region of a spec: exact volume, membership, bounding box and periodicity. */
export function makeRegion(spec: RegionSpec): Region {
  return (regionGeometries[spec.kind] as RegionGeometry).make(spec);
}

/**
 * The continuum spectrum of iΔ for N elements in a region of this kind (first `count` values,
 * descending), or null when none is known or `kind` names no region (an imported set).
 */
export function continuumSpectrumFor(kind: string, n: number, count: number): Float64Array | null {
  const geometry = Object.hasOwn(regionGeometries, kind) ? (regionGeometries[kind as RegionKind] as RegionGeometry) : undefined;
  return geometry?.continuumSpectrum ? geometry.continuumSpectrum(n, count) : null;
}
