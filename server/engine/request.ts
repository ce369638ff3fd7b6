import type { RegionSpec, RenyiOrder, RestrictedCut, SprinklingSpecInput, SubregionPair, SubregionSpec, TruncationRule, VacuumStage } from '@shared/vacuum';
import type { EntropyResult } from './entropy';
import type { ManifoldLikeness } from './manifoldLikeness';
import type { MutualInformationResult } from './mutualInformation';
import type { BackendPreference } from './linalg';
import type { LinearAlgebraBackend } from './linalg/backend';
import type { SjDiagnostics } from './sjDiagnostics';
import type { SjState } from './sjState';
import type { Sprinkling } from './sprinkle';
import type { EngineName, EngineRequest } from './structured/engineChoice';
import type { KneeFit } from './truncation';

/** Stamped on every result (run and study cell), so a stored number says which engine made it. */
export const ENGINE_VERSION = 'tacet-engine 0.1.0';

export type PointSource =
  | { kind: 'sprinkling'; sprinkling: SprinklingSpecInput }
  | {
      kind: 'points';
      /** flat coordinates, `dimension` per element */
      points: ArrayLike<number>;
      dimension: 2 | 4;
      /** ρ; or give the region the points were drawn in, then ρ = N/V */
      density?: number;
      region?: RegionSpec;
    }
  | {
      /** a causal set given by its order alone (an imported relation list): no coordinates */
      kind: 'order';
      /**
       * the transitively closed relation, bit-packed like BitRelation: ⌈count/32⌉ uint32 words per
       * row, bit j of row i set iff i ≺ j
       */
      causal: Uint32Array;
      count: number;
      /** chooses the Green function (2D: ½Cᵀ, 4D: from the links) */
      dimension: 2 | 4;
      /** ρ, needed for a massive field and in 4D */
      density?: number;
    };

export interface VacuumRequest {
  source: PointSource;
  mass?: number;
  truncation?: TruncationRule;
  subregion?: SubregionSpec;
  doubleTruncation?: boolean;
  /** the second cut of double truncation (default √n/(4π)); only with doubleTruncation */
  restrictedCut?: RestrictedCut;
  backend?: BackendPreference | LinearAlgebraBackend;
  /** also return the SJ state (kept eigenvectors and Δ) for further use (dense engine only) */
  keepState?: boolean;
  /** dense, structured (2D, modes above a cut only) or auto: the rule in structured/engineChoice.ts */
  engine?: EngineRequest;
  /** Rényi orders of the subregion's entropy (renyi.ts); needs a subregion */
  renyi?: RenyiOrder[];
  /** two spacelike subregions for I(A:B) on the same state, under the request's rule (mutualInformation.ts) */
  mutualInformation?: SubregionPair;
  /** also the entropy of the subregion's causal complement in the region; needs a subregion */
  complement?: boolean;
}

export interface VacuumHooks {
  onProgress?(stage: VacuumStage, fraction: number): void;
  shouldCancel?(): boolean;
}

export interface VacuumResult {
  engineVersion: string;
  /** which engine ran, and why (structured: `eigenvalues` holds only the computed modes above the cut) */
  engine: EngineName;
  engineReason: string;
  backend: string;
  dimension: 2 | 4;
  N: number;
  points: Float64Array;
  /** ρ, null when neither a density nor a region was known */
  density: number | null;
  volume: number | null;
  region: RegionSpec | null;
  sprinkling: Sprinkling['provenance'] | null;
  mass: number;
  relations: number;
  links: number | null;
  /** all positive eigenvalues of iΔ, descending */
  eigenvalues: Float64Array;
  truncation: TruncationRule;
  cutoff: number;
  modesKept: number;
  knee: KneeFit | null;
  diagnostics: SjDiagnostics;
  entropy: (EntropyResult & { elements: Int32Array; /** S_α by renyiKey, when orders were asked */ renyi: Record<string, number> | null }) | null;
  /** I(A:B) with the entropies of A, B and A∪B, when a pair was asked */
  mutualInformation: MutualInformationResult | null;
  /**
   * the entropy of the causal complement O′ (elements unrelated to every element of O) beside S_O: for a
   * pure whole-region state the two agree in the continuum, so `difference` = S_O′ − S_O is a purity check
   */
  complement: (EntropyResult & { elements: Int32Array; difference: number }) | null;
  /**
   * counts and dimension estimators of the causal set (manifoldLikeness.ts), added by the engine thread
   * after the vacuum (the pipelines leave it out, so their timings are the vacuum's alone)
   */
  manifold?: ManifoldLikeness | null;
  /** cautions for the rule used on this dimension (shared/vacuum.ts ruleCautions), to show beside the result */
  cautions: string[];
  /** seconds per stage */
  timings: Partial<Record<VacuumStage, number>>;
  state?: SjState;
}

/** The rule a request runs with: its own, else √N/(4π) for double truncation, else the whole spectrum. */
export function requestTruncation(request: Pick<VacuumRequest, 'truncation' | 'doubleTruncation'>): TruncationRule {
  return request.truncation ?? (request.doubleTruncation ? { rule: 'sqrtN' } : { rule: 'none' });
}
