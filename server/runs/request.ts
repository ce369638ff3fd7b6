import type { RegionSpec, RenyiOrder, RestrictedCut, SprinklingSpec, SubregionPair, SubregionSpec, TruncationRule } from '@shared/vacuum';
import { EngineInputError, type VacuumRequest } from '../engine/index';

/** Where a run's elements came from, kept in the run's stored request. */
export interface CausalSetReference {
  id: string;
  name: string;
  kind: 'coordinates' | 'relations';
  /** SHA-256 of the uploaded file */
  checksum: string;
  N: number;
  density: number | null;
  region: RegionSpec | null;
}

/**
 * The region kind whose continuum a run's spectrum is compared with: the sprinkled region's, or the
 * region an imported set of coordinates was declared with (its elements are taken to fill it
 * uniformly, as a sprinkling would); null for an imported set without one (a relation list, or
 * coordinates scaled by a density alone).
 */
export function continuumRegionKind(rowRegionKind: string, request: Pick<StoredRunRequest, 'causalSet'>): string | null {
  if (rowRegionKind !== 'imported') return rowRegionKind;
  const set = request.causalSet;
  return set && set.kind === 'coordinates' && set.region ? set.region.kind : null;
}

/**
 * The request stored with a run. A fresh run keeps the validated POST body; a re-analysis keeps its
 * own settings, the parent's sprinkling (for provenance and the region) and `reusedPoints`, and
 * carries the parent's points in its own row.
 */
export interface StoredRunRequest {
  title?: string;
  mass: number;
  truncation: TruncationRule;
  subregion?: SubregionSpec;
  doubleTruncation: boolean;
  /** the second cut of double truncation; absent: √n/(4π) */
  restrictedCut?: RestrictedCut;
  sprinkling?: SprinklingSpec;
  reusedPoints?: { runId: string; N: number; density: number | null };
  /** an imported causal set; its elements are copied into the run's row */
  causalSet?: CausalSetReference;
  /** dense, structured or auto (absent: auto) */
  engine?: 'auto' | 'dense' | 'structured';
  /** Rényi orders of the subregion's entropy (absent: none) */
  renyi?: RenyiOrder[];
  /** the pair A, B of the mutual information (absent: none) */
  mutualInformation?: SubregionPair;
  /** the entropy of the subregion's causal complement beside S (absent: false) */
  complement?: boolean;
}

/**
 * The engine request for a stored run, the one mapping the API (to validate before storing) and the
 * worker (to compute) share; `points` are the run's stored points when it reuses some, `relation`
 * the bit-packed closed relation of a run on an imported relation list.
 */
export function toEngineRequest(
  request: StoredRunRequest,
  dimension: 2 | 4,
  points: Float64Array | null,
  relation: Uint32Array | null = null,
): Omit<VacuumRequest, 'backend'> {
  const settings = {
    mass: request.mass,
    truncation: request.truncation,
    subregion: request.subregion,
    doubleTruncation: request.doubleTruncation,
    ...(request.restrictedCut ? { restrictedCut: request.restrictedCut } : {}),
    ...(request.engine ? { engine: request.engine } : {}),
    ...(request.renyi ? { renyi: request.renyi } : {}),
    ...(request.mutualInformation ? { mutualInformation: request.mutualInformation } : {}),
    ...(request.complement ? { complement: true } : {}),
  };
  if (request.causalSet?.kind === 'relations') {
    const imported = request.causalSet;
    if (!relation) throw new EngineInputError(`this run has lost the relation of the causal set "${imported.name}"`);
    const density = imported.density !== null ? { density: imported.density } : {};
    return { ...settings, source: { kind: 'order', causal: relation, count: imported.N, dimension, ...density } };
  }
  if (request.causalSet) {
    const imported = request.causalSet;
    if (!points) throw new EngineInputError(`this run has lost the elements of the causal set "${imported.name}"`);
    // with the region the engine checks membership, takes ρ = N/V and the periodic x of a cylinder
    const placement = imported.region ? { region: imported.region } : imported.density !== null ? { density: imported.density } : {};
    return { ...settings, source: { kind: 'points', points, dimension, ...placement } };
  }
  if (request.reusedPoints) {
    if (!points) throw new EngineInputError('this re-analysis has lost the points it was to reuse');
    return {
      ...settings,
      source: {
        kind: 'points',
        points,
        dimension,
        density: request.reusedPoints.density ?? undefined,
        region: request.sprinkling?.region,
      },
    };
  }
  if (!request.sprinkling) throw new EngineInputError('the run has neither a sprinkling nor stored points');
  return { ...settings, source: { kind: 'sprinkling', sprinkling: request.sprinkling } };
}
