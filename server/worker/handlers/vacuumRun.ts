import { belowEntropyFloor, formatEntropy, formatQuantity, formatSignificantDigits } from '@shared/precision';
import { sortRenyiKeys } from '@shared/studies';
import { entropyRuleLabel, vacuumStages, type VacuumStage } from '@shared/vacuum';
import { decodeFloat64, decodeRelationWords } from '../../db/codecs';
import * as runs from '../../db/repositories/runs';
import type { RunRow } from '../../db/run-entities';
import { ENGINE_VERSION, type VacuumResult } from '../../engine/index';
import type { JobPayload } from '../../queue/jobs';
import { outcomeOf } from '../../runs/outcome';
import { toEngineRequest, type StoredRunRequest } from '../../runs/request';
import { runInEngineThread } from '../../threads/engineThread';
import type { JobHandler } from '../context';
import { runComputeJob, type AuthorMail, type JobEnd } from '../jobRunner';

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

const storedRequest = (run: RunRow) => run.request as unknown as StoredRunRequest;

/** The engine request of the claimed row, with the points or relation it carries. */
function engineRequestOf(run: RunRow) {
  const request = storedRequest(run);
  const relation = run.relation && request.causalSet ? decodeRelationWords(run.relation, request.causalSet.N) : null;
  return toEngineRequest(request, run.dimension, run.points ? decodeFloat64(run.points) : null, relation);
}

function doneDetail(result: VacuumResult): string {
  // the structured engine computes only the modes above the cut, so "k of k" would say nothing
  const kept =
    result.engine === 'structured'
      ? `${result.modesKept} modes above the cut (the structured engine computes only those)`
      : `modes kept ${result.modesKept} of ${result.eigenvalues.length}`;
  const lines = [`N = ${result.N}, ${kept} (cut λ = ${formatQuantity(result.cutoff, 'cut')}).`];
  if (result.entropy) {
    const rule = entropyRuleLabel({ truncation: result.truncation, doubleTruncation: result.entropy.doubleTruncation, restrictedCut: result.entropy.restrictedCut });
    lines.push(`Entropy of the subregion (${result.entropy.n} elements, ${rule}): S = ${formatEntropy(result.entropy.S)}.`);
    if (result.entropy.renyi) {
      const orders = sortRenyiKeys(Object.keys(result.entropy.renyi));
      lines.push(`Rényi entropies: ${orders.map((key) => `S_${key === 'inf' ? '∞' : key} = ${formatEntropy(result.entropy!.renyi![key])}`).join(', ')}.`);
    }
    if (result.complement) {
      const difference = result.complement.difference;
      lines.push(`Causal complement (${result.complement.n} elements): S = ${formatEntropy(result.complement.S)}, S_O′ − S_O = ${belowEntropyFloor(difference) ? formatEntropy(difference) : formatSignificantDigits(difference, 2)}.`);
    }
  }
  if (result.mutualInformation) {
    const mi = result.mutualInformation;
    lines.push(`Mutual information: I(A:B) = ${formatQuantity(mi.I, 'entropy')} (S_A = ${formatEntropy(mi.a.S)}, S_B = ${formatEntropy(mi.b.S)}, S_A∪B = ${formatEntropy(mi.union.S)}).`);
  }
  for (const caution of result.cautions) lines.push(`Caution: ${caution}`);
  return lines.join('\n');
}

/** The author is told about a finished or failed run (the runner sends it when their switch is on). */
function authorMail(appUrl: string, run: RunRow, end: JobEnd<VacuumResult>): AuthorMail {
  const name = run.title || run.id.slice(0, 8);
  const done = end.status === 'done';
  return {
    authorId: run.authorId,
    teamId: run.teamId,
    about: `run ${run.id}`,
    subject: `Tacet: run ${name} ${done ? 'finished' : 'failed'}`,
    lines: [
      done ? `your run "${name}" has finished.` : `your run "${name}" has failed.`,
      end.status === 'done' ? doneDetail(end.result) : `The engine said: ${end.message}`,
    ],
    link: `${appUrl}/runs/${run.id}`,
  };
}

/**
 * Job `vacuum-run` { runId }: claims the run, computes it in an engine thread, stores the result in
 * one statement and e-mails the author (the flow is server/worker/jobRunner.ts).
 */
export const vacuumRunHandler: JobHandler<JobPayload<'vacuum-run'>> = (job, context) => {
  const m = context.dataSource.manager;
  const { runId } = job.data;
  return runComputeJob<RunRow, VacuumResult>(job, context, {
    label: `run ${runId}`,
    key: { runId },
    claim: () => runs.claimRun(m, runId),
    compute: async (run, thread) => runInEngineThread(engineRequestOf(run), thread),
    percent: (run, stage, fraction) => {
      const request = storedRequest(run);
      // a run with only a mutual-information pair has an entropy stage too
      return overallPercent(stage, fraction, request.subregion !== undefined || request.mutualInformation !== undefined);
    },
    saveProgress: (stage, percent) => runs.updateRunProgress(m, runId, stage, percent),
    control: () => runs.runControlState(m, runId),
    markCancelled: () => runs.markRunCancelled(m, runId),
    markFailed: (message, result) => runs.markRunFailed(m, runId, message, result?.backend ?? null, result?.engineVersion ?? ENGINE_VERSION),
    complete: (result) => runs.completeRun(m, runId, outcomeOf(result)),
    ended: async (run, end) => authorMail(context.config.appUrl, run, end),
    summary: (result) => ({ N: result.N, modesKept: result.modesKept }),
  });
};
