import { UnrecoverableError, type Job } from 'bullmq';
import { entropyRuleLabel, vacuumStages, type VacuumStage } from '../../../shared/vacuum';
import { decodeRelationWords } from '../../api/services/causal-set-service';
import { toEngineRequest, vacuumRunJobName, type StoredRunRequest } from '../../api/services/run-service';
import { decodeFloat64, encodeFloat64, encodeInt32 } from '../../db/arrays';
import { UserEntity } from '../../db/entities';
import * as runs from '../../db/repositories/runs';
import type { RunRow, RunSummaryRecord } from '../../db/run-entities';
import { CancelledError, ENGINE_VERSION, EngineInputError, type VacuumResult } from '../../engine/index';
import { AbandonedError, runInEngineThread } from '../engineThread';
import type { JobHandler, WorkerContext } from './index';

export { vacuumRunJobName };

/**
 * Rough share of the work per stage, for one progress bar over the whole run: the
 * eigendecomposition dominates, the SJ state and its diagnostics come next.
 */
const stageWeights: Record<VacuumStage, number> = { sprinkle: 2, order: 8, green: 10, spectrum: 55, state: 20, entropy: 5 };

export function overallPercent(stage: VacuumStage, fraction: number, withEntropy: boolean): number {
  const stages = vacuumStages.filter((s) => withEntropy || s !== 'entropy');
  const total = stages.reduce((sum, s) => sum + stageWeights[s], 0);
  const before = stages.slice(0, stages.indexOf(stage)).reduce((sum, s) => sum + stageWeights[s], 0);
  return Math.round((1000 * (before + fraction * stageWeights[stage])) / total) / 10;
}

/** Writes at most one progress row every `intervalMs` (a new stage always), one write at a time. */
function progressWriter(context: WorkerContext, job: Job, runId: string, withEntropy: boolean, intervalMs = 250) {
  let chain: Promise<unknown> = Promise.resolve();
  let lastWrite = 0;
  let lastStage: VacuumStage | null = null;
  return {
    report(stage: VacuumStage, fraction: number) {
      const now = Date.now();
      if (stage === lastStage && now - lastWrite < intervalMs) return;
      lastStage = stage;
      lastWrite = now;
      const percent = overallPercent(stage, fraction, withEntropy);
      chain = chain
        .then(() => runs.updateRunProgress(context.dataSource.manager, runId, stage, percent))
        .then(() => job.updateProgress({ stage, percent }))
        .catch((error: Error) => console.warn(`[worker] progress of run ${runId} not saved: ${error.message}`));
    },
    flushed: () => chain,
  };
}

/** The engine's diagnostics under the names of shared/runs.ts, with the engine's own fields beside them. */
function diagnosticsRecord(d: VacuumResult['diagnostics']): Record<string, unknown> {
  return {
    hermiticity: d.hermiticityError,
    minEigenvalueW: d.smallestEigenvalue,
    commutatorResidual: d.commutatorError,
    positiveNegativeOverlap: d.orthogonalityError,
    ...d,
  };
}

export function outcomeOf(result: VacuumResult): runs.RunOutcome {
  const summary: RunSummaryRecord = {
    density: result.density,
    volume: result.volume,
    relations: result.relations,
    links: result.links,
    cutoff: result.cutoff,
    modesKept: result.modesKept,
    knee: result.knee,
    diagnostics: diagnosticsRecord(result.diagnostics),
    timings: result.timings as Record<string, number>,
    entropy: result.entropy
      ? {
          S: result.entropy.S,
          n: result.entropy.n,
          modesKept: result.entropy.modesKept,
          cutoff: result.entropy.cutoff,
          doubleTruncation: result.entropy.doubleTruncation,
          restrictedCut: result.entropy.restrictedCut,
        }
      : null,
    cautions: result.cautions,
    engine: result.engine,
    engineReason: result.engineReason,
  };
  return {
    n: result.N,
    engineVersion: result.engineVersion,
    backend: result.backend,
    entropyS: result.entropy?.S ?? null,
    summary,
    points: encodeFloat64(result.points),
    eigenvalues: encodeFloat64(result.eigenvalues),
    generalizedEigenvalues: result.entropy ? encodeFloat64(result.entropy.generalizedEigenvalues) : null,
    subregionElements: result.entropy ? encodeInt32(result.entropy.elements) : null,
  };
}

/** The author is told about a finished or failed run unless they turned the switch off. */
async function notifyAuthor(context: WorkerContext, run: RunRow, status: 'done' | 'failed', detail: string): Promise<void> {
  const author = await context.dataSource.manager.findOneBy(UserEntity, { id: run.authorId });
  if (!author || !author.notifyOnRunDone) return;
  const name = run.title || run.id.slice(0, 8);
  const link = `${context.config.appUrl}/runs/${run.id}`;
  try {
    await context.mailer.send({
      to: author.email,
      teamId: run.teamId,
      subject: `Tacet: run ${name} ${status === 'done' ? 'finished' : 'failed'}`,
      text: [
        `Hello ${author.name},`,
        '',
        status === 'done' ? `your run "${name}" has finished.` : `your run "${name}" has failed.`,
        detail,
        '',
        `Open it: ${link}`,
        '',
        'You get these messages because run e-mails are switched on in your account settings.',
      ].join('\n'),
    });
  } catch (error) {
    console.warn(`[worker] could not e-mail ${author.email} about run ${run.id}: ${(error as Error).message}`);
  }
}

function doneDetail(result: VacuumResult): string {
  const lines = [`N = ${result.N}, modes kept ${result.modesKept} of ${result.eigenvalues.length} (cut λ = ${result.cutoff.toPrecision(6)}).`];
  if (result.entropy) {
    const rule = entropyRuleLabel({ truncation: result.truncation, doubleTruncation: result.entropy.doubleTruncation, restrictedCut: result.entropy.restrictedCut });
    lines.push(`Entropy of the subregion (${result.entropy.n} elements, ${rule}): S = ${result.entropy.S.toPrecision(6)}.`);
  }
  for (const caution of result.cautions) lines.push(`Caution: ${caution}`);
  return lines.join('\n');
}

/**
 * Job `vacuum-run` { runId }: claims the run, computes it in an engine thread, stores the result in
 * one statement and e-mails the author. Cancellation is polled from the row; a run never stays
 * running after this returns or throws.
 */
export const vacuumRunHandler: JobHandler = async (job: Job<{ runId: string }>, context) => {
  const m = context.dataSource.manager;
  const runId = job.data.runId;
  const run = await runs.claimRun(m, runId);
  if (!run) {
    // cancelled while queued, deleted, already finished, or asked to stop before a re-delivery
    await runs.markRunCancelled(m, runId).catch(() => undefined);
    return { runId, skipped: true };
  }
  const request = run.request as unknown as StoredRunRequest;
  const withEntropy = request.subregion !== undefined;
  const progress = progressWriter(context, job, runId, withEntropy);
  let result: VacuumResult;
  try {
    const relation = run.relation && request.causalSet ? decodeRelationWords(run.relation, request.causalSet.N) : null;
    const engineRequest = toEngineRequest(request, run.dimension, run.points ? decodeFloat64(run.points) : null, relation);
    result = await runInEngineThread(engineRequest, {
      onProgress: (stage, fraction) => progress.report(stage, fraction),
      poll: async () => {
        const state = await runs.runControlState(m, runId);
        return state === 'deleted' ? 'abandon' : state;
      },
    });
    await progress.flushed();
  } catch (error) {
    await progress.flushed();
    if (error instanceof CancelledError) {
      await runs.markRunCancelled(m, runId);
      return { runId, cancelled: true, stage: error.stage };
    }
    if (error instanceof AbandonedError) return { runId, deleted: true };
    const message = (error as Error).message || String(error);
    if (await runs.markRunFailed(m, runId, message, null, ENGINE_VERSION)) await notifyAuthor(context, run, 'failed', `The engine said: ${message}`);
    if (error instanceof EngineInputError) throw new UnrecoverableError(message);
    throw error;
  }

  try {
    if (await runs.completeRun(m, runId, outcomeOf(result))) {
      await notifyAuthor(context, run, 'done', doneDetail(result));
      return { runId, N: result.N, modesKept: result.modesKept };
    }
  } catch (error) {
    const message = `the result could not be stored: ${(error as Error).message}`;
    await runs.markRunFailed(m, runId, message, result.backend, result.engineVersion).catch(() => undefined);
    throw new Error(message);
  }
  // finished, but cancelled (or deleted) while the last stage ran: honour the request
  await runs.markRunCancelled(m, runId);
  return { runId, cancelled: true };
};
