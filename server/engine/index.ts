import type { VacuumStage } from '@shared/vacuum';
import { denseVacuum } from './densePipeline';
import { engineAndLimit } from './engineForRequest';
import { EngineInputError } from './errors';
import { getBackend } from './linalg';
import type { LinearAlgebraBackend } from './linalg/backend';
import { denseSizeLimit } from './limits';
import { placeSource } from './placement';
import type { VacuumHooks, VacuumRequest, VacuumResult } from './request';
import { stageRunner } from './stages';
import { structuredVacuum } from './structured/pipeline';
import { elementListIssue } from './subregionCheck';
import { validateVacuumRequest } from './validate';

// The engine's public face: computeVacuum and the names callers outside the engine use.
export { engineRequests, type EngineName, type EngineRequest } from './structured/engineChoice';
export { CancelledError, EngineInputError } from './errors';
export { ENGINE_VERSION, type PointSource, type VacuumHooks, type VacuumRequest, type VacuumResult } from './request';
export { stageRunner } from './stages';
export { checkDenseSize, DENSE_SIZE_LIMIT, DENSE_SIZE_LIMITS, denseMemoryBytes, denseSizeLimit } from './limits';
export { validateVacuumRequest } from './validate';
export { subregionPairIssue, type SubregionPairIssue } from './subregionCheck';
export { renyiEntropies, renyiEntropy } from './renyi';
export { mutualInformation, pairIssue, unionElements, type MutualInformationResult } from './mutualInformation';
export { causalComplement, lightConeNeighbourhood, relationNeighbourhood, type CausalNeighbourhood } from './causalSeparation';
export type { VacuumStage } from '@shared/vacuum';
export type { EntropyResult } from './entropy';
export type { SjDiagnostics } from './sjDiagnostics';
export type { SjState } from './sjState';
export type { KneeFit, TruncationResult } from './truncation';
export { continuumDiamondSpectrum, continuumMutualInformation } from './continuum';
export { sprinkle } from './sprinkle';
export { makeRegion } from './regions';
export { getBackend } from './linalg';

function resolveBackend(choice: VacuumRequest['backend']): LinearAlgebraBackend {
  if (choice === undefined || typeof choice === 'string') return getBackend(choice ?? 'auto');
  return choice;
}

/**
 * One vacuum computation (server/engine/README.md §1–§11): validates the request, picks the engine by
 * the rule of structured/engineChoice.ts, sprinkles (or takes the given points or relation), then runs
 * the dense pipeline (densePipeline.ts) or the structured one (structured/pipeline.ts). Reports progress
 * per stage and checks `shouldCancel()` before each stage (throws CancelledError).
 */
export async function computeVacuum(request: VacuumRequest, hooks: VacuumHooks = {}): Promise<VacuumResult> {
  const backend = resolveBackend(request.backend);
  const { choice, maxN: sizeLimit } = engineAndLimit(request, denseSizeLimit(backend.name));
  validateVacuumRequest(request, sizeLimit);
  const timings: Partial<Record<VacuumStage, number>> = {};
  const stage = stageRunner(hooks, timings);

  const placed = await stage('sprinkle', () => placeSource(request.source, sizeLimit));
  // a Poisson sprinkling's N is known only now: the labels below its plausible maximum are checked here
  if (request.subregion?.kind === 'elements') {
    const issue = elementListIssue(request.subregion.indices, placed.n, true);
    if (issue) throw new EngineInputError(issue.message, 'subregion.indices');
  }
  const pipeline = { request, placed, stage, backend, choice, timings };
  return choice.engine === 'structured' ? structuredVacuum({ ...pipeline, hooks }) : denseVacuum({ ...pipeline, hooks });
}
