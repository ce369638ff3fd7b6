import seedrandom from 'seedrandom';
import type { PrngName, SprinklingSpec } from '@shared/vacuum';
import { makeRegion, type Region, type RegionMeasure, type UniformSource } from './regions';

export interface Sprinkling {
  /** flat coordinates, element i at [i*dimension, (i+1)*dimension) */
  points: Float64Array;
  dimension: 2 | 4;
  count: number;
  /** ρ: the Poisson intensity, or N/V for the fixed-N variant */
  density: number;
  volume: number;
  region: Region;
  /** what reproduces the run bit for bit */
  provenance: { seed: string; prng: `seedrandom.${PrngName}`; process: 'fixed' | 'poisson' };
}

export type { UniformSource } from './regions';

/** A uniform source in [0, 1) with 53 random bits from the named `seedrandom` generator. */
export function seededUniform(seed: string, prng: PrngName = 'arc4'): UniformSource {
  const generator = prng === 'arc4' ? seedrandom(seed) : seedrandom[prng](seed);
  return () => generator.double();
}

/**
 * A Poisson(mean) variate by counting the arrivals of a unit-rate Poisson process in [0, mean]: the
 * gaps are independent Exp(1) variates −ln(1−U) (Knuth, TAOCP vol. 2 §3.4.1, recalled from memory).
 * Exact for any mean and free of the exp(−mean) underflow of the product-of-uniforms method; costs
 * O(mean) draws, which is far below the O(N²) of everything that follows.
 */
export function poissonVariate(mean: number, uniform: UniformSource): number {
  if (!(mean >= 0) || !Number.isFinite(mean)) throw new RangeError('Poisson mean must be finite and ≥ 0');
  let elapsed = -Math.log(1 - uniform());
  let count = 0;
  while (elapsed <= mean) {
    count++;
    elapsed -= Math.log(1 - uniform());
  }
  return count;
}

/**
 * `count` points of a region with its own measure (a curved region, server/engine/README.md §17),
 * drawn one after another by its exact sampler.
 */
function measurePoints(measure: RegionMeasure, dimension: number, count: number, uniform: UniformSource): Float64Array {
  const points = new Float64Array(count * dimension);
  for (let i = 0; i < count; i++) measure.draw(uniform, points, i * dimension);
  return points;
}

/** `count` points uniform in the region by rejection from its bounding box (exact for any shape). */
export function uniformPoints(region: Region, count: number, uniform: UniformSource): Float64Array {
  const d = region.dimension;
  const { min, max } = region.boundingBox;
  const points = new Float64Array(count * d);
  const candidate = new Array<number>(d);
  for (let i = 0; i < count; i++) {
    for (;;) {
      for (let k = 0; k < d; k++) candidate[k] = min[k] + (max[k] - min[k]) * uniform();
      if (region.contains(candidate)) break;
    }
    for (let k = 0; k < d; k++) points[i * d + k] = candidate[k];
  }
  return points;
}

/**
 * A sprinkling (Bombelli–Lee–Meyer–Sorkin 1987, PRL 59 521): Poisson — N ~ Poisson(ρV) then N uniform
 * points — or the fixed-N variant with ρ = N/V. "Uniform" is in the volume element: dt dx on flat
 * regions, √−g on a region with its own measure (de Sitter, server/engine/README.md §17). The seed
 * string, the generator and the draw order fully determine the points.
 */
export function sprinkle(spec: SprinklingSpec): Sprinkling {
  const region = makeRegion(spec.region);
  const uniform = seededUniform(spec.seed, spec.prng);
  let count: number;
  let density: number;
  if (spec.process === 'fixed') {
    if (spec.count === undefined) throw new RangeError('a fixed-N sprinkling needs count');
    count = spec.count;
    density = count / region.volume;
  } else {
    density = spec.density ?? (spec.count as number) / region.volume;
    count = poissonVariate(density * region.volume, uniform);
  }
  return {
    points: region.measure ? measurePoints(region.measure, region.dimension, count, uniform) : uniformPoints(region, count, uniform),
    dimension: region.dimension,
    count,
    density,
    volume: region.volume,
    region,
    provenance: { seed: spec.seed, prng: `seedrandom.${spec.prng}`, process: spec.process },
  };
}
