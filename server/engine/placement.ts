import { regionSpecSchema, sprinklingSpecSchema } from '@shared/vacuum';
import { EngineInputError } from './errors';
import { checkDenseSize } from './limits';
import { BitRelation } from './order';
import { makeRegion, type Region } from './regions';
import type { PointSource } from './request';
import { sprinkle, type Sprinkling } from './sprinkle';

/** The elements a computation runs on, once sprinkled or taken from the request. */
export interface PlacedPoints {
  /** flat coordinates, `dimension` per element; empty for a set given by its order alone */
  points: Float64Array;
  n: number;
  dimension: 2 | 4;
  density: number | null;
  region: Region | null;
  /** the closed relation of a set given by its order alone (no coordinates), else null */
  relation: BitRelation | null;
  provenance: Sprinkling['provenance'] | null;
}

/**
 * The `sprinkle` stage of both engines: sprinkles (then checks the drawn N against `sizeLimit`), takes
 * given points (each must lie in the stated region; ρ = N/V from that region unless a density is given)
 * or unpacks a given relation. The source is expected to have passed validateVacuumRequest.
 */
export function placeSource(source: PointSource, sizeLimit: number): PlacedPoints {
  if (source.kind === 'sprinkling') {
    const s = sprinkle(sprinklingSpecSchema.parse(source.sprinkling));
    checkDenseSize(s.count, sizeLimit);
    return { points: s.points, dimension: s.dimension, n: s.count, density: s.density, region: s.region, relation: null, provenance: s.provenance };
  }
  if (source.kind === 'order') {
    const relation = BitRelation.fromWords(source.causal, source.count);
    return { points: new Float64Array(0), dimension: source.dimension, n: source.count, density: source.density ?? null, region: null, relation, provenance: null };
  }
  const points = Float64Array.from(source.points);
  const region = source.region ? makeRegion(regionSpecSchema.parse(source.region)) : null;
  if (region) {
    const d = source.dimension;
    for (let i = 0; i < points.length / d; i++) {
      if (!region.contains(points.subarray(i * d, (i + 1) * d))) {
        throw new EngineInputError(`element ${i} lies outside the ${region.spec.kind} region`);
      }
    }
  }
  const n = points.length / source.dimension;
  const density = source.density ?? (region ? n / region.volume : null);
  return { points, dimension: source.dimension, n, density, region, relation: null, provenance: null };
}
