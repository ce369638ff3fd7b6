import { gunzipSync } from 'node:zlib';
import { UnrecoverableError, type Job } from 'bullmq';
import { createStudyRequestSchema, type StudyCausalSet } from '../../../shared/studies';
import type { VacuumStage } from '../../../shared/vacuum';
import { encodeFloat64 } from '../../db/arrays';
import { UserEntity } from '../../db/entities';
import * as studies from '../../db/repositories/studies';
import { CancelledError, ENGINE_VERSION, EngineInputError } from '../../engine/index';
import { decodeRelationWords } from '../../api/services/causal-set-service';
import { unpackPoints } from '../../causalSets/parse';
import type { ImportedCellSource, StudyCellResult, StudyCellSpec } from '../../studies/cell';
import { cellSprinkling } from '../../studies/plan';
import { AbandonedError, runInThread } from '../engineThread';
import type { JobHandler, WorkerContext } from './index';

export const studyCellJobName = 'study-cell';

/** BullMQ job id of a cell ("study-cell-<uuid>"; custom ids may not contain ':'). */
export const studyCellJobId = (cellId: string) => `${studyCellJobName}-${cellId}`;

const cellThreadBody = new URL('../../studies/cellThread.worker.ts', import.meta.url).href;

/** Share of a cell's work per stage, for its percent: the eigendecomposition and the entropies dominate. */
const stageWeights: Record<VacuumStage, number> = { sprinkle: 2, order: 6, green: 6, spectrum: 50, state: 10, entropy: 26 };
const stageOrder: VacuumStage[] = ['sprinkle', 'order', 'green', 'spectrum', 'state', 'entropy'];

export function cellPercent(stage: VacuumStage, fraction: number): number {
  const before = stageOrder.slice(0, stageOrder.indexOf(stage)).reduce((s, k) => s + stageWeights[k], 0);
  return Math.round(10 * (before + fraction * stageWeights[stage])) / 10;
}

async function notifyAuthor(context: WorkerContext, studyId: string, status: 'done' | 'failed'): Promise<void> {
  const study = await studies.findStudyById(context.dataSource.manager, studyId);
  if (!study) return;
  const author = await context.dataSource.manager.findOneBy(UserEntity, { id: study.authorId });
  if (!author || !author.notifyOnRunDone) return;
  const name = study.title || study.id.slice(0, 8);
  try {
    await context.mailer.send({
      to: author.email,
      teamId: study.teamId,
      subject: `Tacet: study ${name} ${status === 'done' ? 'finished' : 'failed'}`,
      text: [
        `Hello ${author.name},`,
        '',
        status === 'done'
          ? `your scaling study "${name}" has finished: all ${study.cellsTotal} sprinklings are computed.`
          : `your scaling study "${name}" has finished with failures: ${study.error ?? ''}`,
        '',
        `Open it: ${context.config.appUrl}/studies/${study.id}`,
        '',
        'You get these messages because run e-mails are switched on in your account settings.',
      ].join('\n'),
    });
  } catch (error) {
    console.warn(`[worker] could not e-mail ${author.email} about study ${study.id}: ${(error as Error).message}`);
  }
}

async function closeStudy(context: WorkerContext, studyId: string): Promise<void> {
  const status = await studies.finishStudyIfComplete(context.dataSource.manager, studyId);
  if (status) await notifyAuthor(context, studyId, status);
}

/** The cell's copy of its imported causal set, decoded as the engine takes it. */
async function importedSource(
  context: WorkerContext,
  sets: StudyCausalSet[] | null,
  cellId: string,
  setId: string,
): Promise<ImportedCellSource> {
  const set = sets?.find((s) => s.id === setId);
  if (!set) throw new Error(`the study no longer names the causal set ${setId} of this cell`);
  const stored = await studies.cellElements(context.dataSource.manager, cellId);
  if (!stored) throw new Error(`this cell has lost its copy of the causal set "${set.name}"`);
  if (set.kind === 'relations') {
    return { kind: 'order', causal: decodeRelationWords(stored, set.N), count: set.N, dimension: set.dimension, density: set.density };
  }
  return { kind: 'points', points: unpackPoints(gunzipSync(stored)), dimension: set.dimension, region: set.region, density: set.density };
}

/**
 * Job `study-cell` { studyId, cellId }: one sprinkling of a study, every subregion and rule on it,
 * computed in an engine thread. Results are stored per cell; the last cell closes the study. A cell
 * of a cancelled study is skipped; a cell whose worker died is taken up again when BullMQ re-delivers
 * its stalled job.
 */
export const studyCellHandler: JobHandler = async (job: Job<{ studyId: string; cellId: string }>, context) => {
  const m = context.dataSource.manager;
  const { cellId, studyId } = job.data;
  const claimed = await studies.claimCell(m, cellId);
  if (!claimed) {
    await studies.markCellCancelled(m, cellId).catch(() => undefined);
    return { cellId, skipped: true };
  }
  const request = createStudyRequestSchema.parse(claimed.study.request);
  let imported: ImportedCellSource | undefined;
  if (request.source === 'imported') {
    try {
      imported = await importedSource(context, claimed.study.causalSets, claimed.cell.id, claimed.cell.seed);
    } catch (error) {
      const message = (error as Error).message;
      if (await studies.markCellFailed(m, cellId, message, ENGINE_VERSION)) await closeStudy(context, studyId);
      throw new UnrecoverableError(message);
    }
  }
  const spec: StudyCellSpec = {
    ...(request.source === 'sprinkled' ? { sprinkling: cellSprinkling(request, claimed.cell.requestedN, claimed.cell.seed) } : { imported }),
    mass: request.mass,
    subregions: claimed.study.subregions,
    rules: request.rules,
  };

  let chain: Promise<unknown> = Promise.resolve();
  let lastWrite = 0;
  let lastStage: VacuumStage | null = null;
  const report = (stage: VacuumStage, fraction: number) => {
    const now = Date.now();
    if (stage === lastStage && now - lastWrite < 250) return;
    lastStage = stage;
    lastWrite = now;
    const percent = cellPercent(stage, fraction);
    chain = chain
      .then(() => studies.updateCellProgress(m, cellId, percent))
      .then(() => job.updateProgress({ stage, percent }))
      .catch((error: Error) => console.warn(`[worker] progress of study cell ${cellId} not saved: ${error.message}`));
  };

  let result: StudyCellResult;
  try {
    result = await runInThread<StudyCellResult>(cellThreadBody, { spec }, {
      onProgress: report,
      poll: async () => {
        const state = await studies.cellControlState(m, cellId);
        return state === 'deleted' ? 'abandon' : state;
      },
    });
    await chain;
  } catch (error) {
    await chain;
    if (error instanceof CancelledError) {
      await studies.markCellCancelled(m, cellId);
      return { cellId, cancelled: true };
    }
    if (error instanceof AbandonedError) return { cellId, deleted: true };
    const message = (error as Error).message || String(error);
    if (await studies.markCellFailed(m, cellId, message, ENGINE_VERSION)) await closeStudy(context, studyId);
    if (error instanceof EngineInputError) throw new UnrecoverableError(message);
    throw error;
  }

  const stored = await studies.completeCell(m, cellId, {
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
  });
  if (!stored) {
    await studies.markCellCancelled(m, cellId);
    return { cellId, cancelled: true };
  }
  await closeStudy(context, studyId);
  return { cellId, N: result.N, entropies: result.entropies.length };
};
