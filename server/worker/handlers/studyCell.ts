import { createStudyRequestSchema, type StudyCausalSet } from '@shared/studies';
import type { VacuumStage } from '@shared/vacuum';
import { decodeFloat64, decodeRelationWords, encodeFloat64 } from '../../db/codecs';
import * as studies from '../../db/repositories/studies';
import type { StudyCellRow, StudyRow } from '../../db/study-entities';
import { ENGINE_VERSION, EngineInputError } from '../../engine/index';
import type { JobPayload } from '../../queue/jobs';
import type { ImportedCellSource, StudyCellResult, StudyCellSpec } from '../../studies/cell';
import { cellSprinkling } from '../../studies/plan';
import { runInThread } from '../../threads/engineThread';
import type { JobHandler, WorkerContext } from '../context';
import { runComputeJob, type AuthorMail } from '../jobRunner';

const cellThreadBody = new URL('../../studies/cellThread.worker.ts', import.meta.url).href;

/** Share of a cell's work per stage, for its percent: the eigendecomposition and the entropies dominate. */
const stageWeights: Record<VacuumStage, number> = { sprinkle: 2, order: 6, green: 6, spectrum: 50, state: 10, entropy: 26 };
const stageOrder: VacuumStage[] = ['sprinkle', 'order', 'green', 'spectrum', 'state', 'entropy'];

export function cellPercent(stage: VacuumStage, fraction: number): number {
  const before = stageOrder.slice(0, stageOrder.indexOf(stage)).reduce((s, k) => s + stageWeights[k], 0);
  return Math.round(10 * (before + fraction * stageWeights[stage])) / 10;
}

type ClaimedCell = { cell: StudyCellRow; study: StudyRow };

/** The cell's copy of its imported causal set, decoded as the engine takes it. */
async function importedSource(context: WorkerContext, sets: StudyCausalSet[] | null, cellId: string, setId: string): Promise<ImportedCellSource> {
  const set = sets?.find((s) => s.id === setId);
  if (!set) throw new EngineInputError(`the study no longer names the causal set ${setId} of this cell`);
  const stored = await studies.cellElements(context.dataSource.manager, cellId);
  if (!stored) throw new EngineInputError(`this cell has lost its copy of the causal set "${set.name}"`);
  if (set.kind === 'relations') {
    return { kind: 'order', causal: decodeRelationWords(stored, set.N), count: set.N, dimension: set.dimension, density: set.density };
  }
  return { kind: 'points', points: decodeFloat64(stored), dimension: set.dimension, region: set.region, density: set.density };
}

/** What the engine thread computes for the claimed cell: its sprinkling or imported set, the study's subregions and rules. */
async function cellSpec(context: WorkerContext, { cell, study }: ClaimedCell): Promise<StudyCellSpec> {
  const request = createStudyRequestSchema.parse(study.request);
  const source =
    request.source === 'sprinkled'
      ? { sprinkling: cellSprinkling(request, cell.requestedN, cell.seed) }
      : { imported: await importedSource(context, study.causalSets, cell.id, cell.seed) };
  return { ...source, mass: request.mass, subregions: study.subregions, rules: request.rules, ...(request.renyi ? { renyi: request.renyi } : {}) };
}

/** Closes the study once its last cell has ended; its author hears about a closed study. */
async function closeStudy(context: WorkerContext, studyId: string): Promise<AuthorMail | null> {
  const m = context.dataSource.manager;
  const status = await studies.finishStudyIfComplete(m, studyId);
  const study = status ? await studies.findStudyById(m, studyId) : null;
  if (!status || !study) return null;
  const name = study.title || study.id.slice(0, 8);
  return {
    kind: 'study',
    authorId: study.authorId,
    teamId: study.teamId,
    about: `study ${study.id}`,
    subject: `Tacet: study ${name} ${status === 'done' ? 'finished' : 'finished with failed cells'}`,
    lines: [
      status === 'done'
        ? `your scaling study "${name}" has finished: all ${study.cellsTotal} sprinklings are computed.`
        : `your scaling study "${name}" has finished with failed cells: ${study.error ?? ''}`,
    ],
    link: `${context.config.appUrl}/studies/${study.id}`,
  };
}

/**
 * Job `study-cell` { studyId, cellId }: one sprinkling of a study, every subregion and rule on it,
 * computed in an engine thread (the flow is server/worker/jobRunner.ts). Results are stored per
 * cell; the last cell closes the study. A cell of a cancelled study is skipped; a cell whose worker
 * died is taken up again when BullMQ re-delivers its stalled job.
 */
export const studyCellHandler: JobHandler<JobPayload<'study-cell'>> = (job, context) => {
  const m = context.dataSource.manager;
  const { cellId, studyId } = job.data;
  return runComputeJob<ClaimedCell, StudyCellResult>(job, context, {
    label: `study cell ${cellId}`,
    key: { cellId },
    claim: () => studies.claimCell(m, cellId),
    compute: async (claimed, thread) => runInThread<StudyCellResult>(cellThreadBody, { spec: await cellSpec(context, claimed) }, thread),
    percent: (_claimed, stage, fraction) => cellPercent(stage, fraction),
    saveProgress: (_stage, percent) => studies.updateCellProgress(m, cellId, percent),
    control: () => studies.cellControlState(m, cellId),
    markCancelled: () => studies.markCellCancelled(m, cellId),
    markFailed: (message, result) => studies.markCellFailed(m, cellId, message, result?.engineVersion ?? ENGINE_VERSION),
    complete: (result) =>
      studies.completeCell(m, cellId, {
        n: result.N,
        engineVersion: result.engineVersion,
        backend: result.backend,
        eigenvalues: encodeFloat64(result.eigenvalues),
        result: {
          density: result.density,
          entropies: result.entropies,
          states: result.states,
          sprinkling: result.sprinkling,
          timings: result.timings as Record<string, number>,
        },
      }),
    ended: () => closeStudy(context, studyId),
    summary: (result) => ({ N: result.N, entropies: result.entropies.length }),
  });
};
