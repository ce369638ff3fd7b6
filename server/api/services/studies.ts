import type { Queue } from 'bullmq';
import type { DataSource } from 'typeorm';
import { In, type EntityManager } from 'typeorm';
import { ZodError } from 'zod';
import {
  createStudyRequestSchema,
  extendStudyRequestSchema,
  nextSeeds,
  sprinkledStudyRequestSchema,
  studyCellRunRequestSchema,
  studyRuleKey,
  studyRuleLabel,
  type ListStudiesQuery,
  type SprinkledStudyRequest,
  type CreateStudyRequest,
  type ImportedStudyRequest,
  type StudyCausalSet,
  type StudyDetail,
  type StudyEntropy,
  type StudySpectrum,
  type StudySummary,
} from '@shared/studies';
import { decodeFloat64, decodeRelationWords } from '../../db/codecs';
import { CausalSetEntity } from '../../db/causal-set-entities';
import type { UserRow } from '../../db/entities';
import * as studies from '../../db/repositories/studies';
import type { StudyWithAuthor, StudyProgressCounts } from '../../db/repositories/studies';
import type { StudyCellRow } from '../../db/study-entities';
import { EngineInputError, validateVacuumRequest } from '../../engine/index';
import { aggregateEntropies, fitAggregates } from '../../studies/aggregate';
import type { StudyCellEntropy } from '../../studies/cell';
import type { StudyExportFormat } from '@shared/exports';
import { exportFile, studyRenderers, type ExportFile } from '../../exports/index';
import { studyCautions, type StudyExportInput } from '../../exports/studies';
import {
  cellSprinkling,
  checkRulesFit,
  engineSubregion,
  pairSubregions,
  planCells,
  planExtension,
  planImportedCells,
  resolveImportedSubregions,
  resolveSubregions,
  ruleLabels,
  StudyPlanError,
  type PlannedCausalSet,
} from '../../studies/plan';
import { discardJob, enqueueJobs, studyCellJobId } from '../../queue/jobs';
import type { RunOrigin } from '@shared/runs';
import { createRunService } from './runs';
import type { TeamContext } from '../context';
import { conflict, HttpError, notFound } from '../errors';
import { readQueueSnapshot, studyTiming } from './queueStatus';

const uuidPattern = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

/**
 * A plan problem is a request that can never be computed (a sub-diamond outside the region, an element
 * that does not exist, a subregion too small): 422 before anything is stored, with the field's path.
 */
function planIssue(error: StudyPlanError): HttpError {
  return new HttpError(422, 'invalid_request', error.message, [{ path: error.path, message: error.message }]);
}

function percentOf(total: number, p: StudyProgressCounts): number {
  const finished = p.done + p.failed + p.cancelled;
  return total > 0 ? Math.round((1000 * (finished + p.runningPercent / 100)) / total) / 10 : 0;
}

/** A stored request from before `source` existed is a study over sprinklings. */
function storedRequest(row: Pick<StudyWithAuthor, 'request'>): CreateStudyRequest {
  const request = row.request as Record<string, unknown>;
  return ('source' in request ? request : { ...request, source: 'sprinkled' }) as unknown as CreateStudyRequest;
}

function countsAndSeeds(row: Pick<StudyWithAuthor, 'request' | 'causalSets'>): { counts: number[]; seedCount: number } {
  const request = storedRequest(row);
  if (request.source === 'sprinkled') return { counts: [...request.counts].sort((a, b) => a - b), seedCount: request.seeds.length };
  const sets = row.causalSets ?? [];
  return { counts: [...new Set(sets.map((s) => s.N))].sort((a, b) => a - b), seedCount: sets.length };
}

export function toStudySummary(row: StudyWithAuthor, progress: StudyProgressCounts, timing: StudySummary['timing']): StudySummary {
  const request = storedRequest(row);
  return {
    id: row.id,
    title: row.title,
    status: row.status,
    author: { id: row.authorId, name: row.authorName },
    createdAt: row.createdAt.toISOString(),
    startedAt: row.startedAt ? row.startedAt.toISOString() : null,
    finishedAt: row.finishedAt ? row.finishedAt.toISOString() : null,
    source: request.source,
    regionKind: row.regionKind,
    ...countsAndSeeds(row),
    rules: request.rules.map((r) => studyRuleKey(r)),
    subregionCount: row.subregions.length,
    progress: {
      done: progress.done,
      failed: progress.failed,
      cancelled: progress.cancelled,
      total: row.cellsTotal,
      percent: percentOf(row.cellsTotal, progress),
    },
    timing,
  };
}

/** One row per computed entropy of the finished cells, in queue order. */
export function entropiesOf(row: Pick<StudyWithAuthor, 'subregions'>, cells: StudyCellRow[]): StudyEntropy[] {
  const fractions = new Map(row.subregions.map((s) => [s.key, s.fraction]));
  const out: StudyEntropy[] = [];
  for (const cell of cells) {
    if (cell.status !== 'done' || !cell.result) continue;
    const states = new Map(cell.result.states.map((s) => [s.rule, s]));
    // a cell's entropies are those of server/studies/cell.ts (Rényi and pair fields when asked)
    for (const e of cell.result.entropies as StudyCellEntropy[]) {
      out.push({
        cellId: cell.id,
        N: cell.requestedN,
        elements: cell.n!,
        seed: cell.seed,
        subregion: e.subregion,
        fraction: fractions.get(e.subregion) ?? null,
        rule: e.rule,
        n: e.n,
        S: e.S,
        modesKept: e.modesKept,
        cutoff: e.cutoff,
        stateModesKept: states.get(e.rule)?.modesKept ?? 0,
        stateCutoff: states.get(e.rule)?.cutoff ?? 0,
        ...(e.renyi ? { renyi: e.renyi } : {}),
        ...(e.pair ? { pair: e.pair } : {}),
      });
    }
  }
  return out;
}

/** EngineInputError → 422 with the cell it is about; the dense limit gets its own code. */
function engineCheck(what: string, request: Parameters<typeof validateVacuumRequest>[0]): void {
  try {
    validateVacuumRequest(request);
  } catch (error) {
    if (error instanceof EngineInputError) {
      const tooLarge = /exceeds the (dense|structured) limit/.test(error.message);
      const issues = error.field ? [{ path: error.field, message: `${what}: ${error.message}` }] : undefined;
      throw new HttpError(422, tooLarge ? 'too_large' : 'invalid_request', `${what}: ${error.message}`, issues);
    }
    throw error;
  }
}

interface LoadedStudySet {
  reference: StudyCausalSet;
  /** the stored elements as causal_sets keeps them; each cell takes a copy */
  elements: Buffer;
  points: Float64Array | null;
  relationWords: Uint32Array | null;
}

/** The picked causal sets of the team in the order picked; an id the team does not have is a field error. */
async function loadStudySets(m: EntityManager, teamId: string, ids: string[]): Promise<LoadedStudySet[]> {
  const keys = ids.map((id) => id.toLowerCase());
  const rows = await m.find(CausalSetEntity, {
    where: { teamId, id: In(keys) },
    select: { id: true, name: true, kind: true, dimension: true, n: true, region: true, density: true, fileName: true, checksum: true, elements: true },
  });
  const byId = new Map(rows.map((r) => [r.id, r]));
  return keys.map((id, k) => {
    const row = byId.get(id);
    if (!row) {
      throw new ZodError([{ code: 'custom', path: ['causalSetIds', k], message: `no imported causal set ${ids[k]} exists in this team`, input: undefined }]);
    }
    const reference: StudyCausalSet = {
      id: row.id,
      name: row.name,
      fileName: row.fileName,
      checksum: row.checksum,
      kind: row.kind,
      dimension: row.dimension,
      N: row.n,
      region: row.region,
      density: row.density,
    };
    return {
      reference,
      elements: row.elements,
      points: row.kind === 'coordinates' ? decodeFloat64(row.elements) : null,
      relationWords: row.kind === 'relations' ? decodeRelationWords(row.elements, row.n) : null,
    };
  });
}

export type StudyService = ReturnType<typeof createStudyService>;

export function createStudyService(deps: { dataSource: DataSource; computeQueue: Queue }) {
  const { dataSource, computeQueue } = deps;
  const m = dataSource.manager;
  // a study cell opened as a run is an ordinary run, made by the runs' own rules
  const runService = createRunService({ dataSource, computeQueue });

  async function findOrThrow(team: TeamContext, id: string): Promise<StudyWithAuthor> {
    const row = uuidPattern.test(id) ? await studies.findStudyInTeam(m, team.id, id.toLowerCase()) : null;
    if (!row) throw notFound('Study not found.');
    return row;
  }

  async function cellOrThrow(row: StudyWithAuthor, cellId: string): Promise<StudyCellRow> {
    const cell = uuidPattern.test(cellId) ? await studies.findCellOfStudy(m, row.id, cellId.toLowerCase()) : null;
    if (!cell) throw notFound('Cell not found in this study.');
    return cell;
  }

  /**
   * Queues cells again: each one's failed job leaves Redis first, since BullMQ adds no job under an id
   * it still holds; one still there is held by a worker closing its last attempt. If the queue refuses
   * the new jobs, the cells are failed again with the reason and nothing stays queued for ever.
   */
  async function requeue(row: StudyWithAuthor, failed: StudyCellRow[], only: string[] | null): Promise<{ cellIds: string[] }> {
    for (const cell of failed) {
      const jobId = studyCellJobId(cell.id);
      await discardJob(computeQueue, jobId);
      if (await computeQueue.getJob(jobId)) {
        throw conflict('cell_busy', `The last attempt of the cell N = ${cell.requestedN}, seed ${cell.seed} is still being closed by a worker; try again in a moment.`);
      }
    }
    const cellIds = await studies.requeueFailedCells(m, row.id, only);
    await enqueueCells(row.id, cellIds);
    return { cellIds };
  }

  async function enqueueCells(studyId: string, cellIds: string[]): Promise<void> {
    if (cellIds.length === 0) return;
    try {
      await enqueueJobs(
        computeQueue,
        'study-cell',
        cellIds.map((cellId) => ({ studyId, cellId })),
      );
    } catch (error) {
      const reason = `The cells could not be queued: ${(error as Error).message}`;
      for (const cellId of cellIds) await studies.failCell(m, cellId, reason);
      await studies.finishStudyIfComplete(m, studyId);
      throw new HttpError(503, 'queue_unavailable', `${reason}. They are stored as failed; retry them when the queue is back.`);
    }
  }

  function requireOpenToMore(row: StudyWithAuthor): void {
    if (row.cancelRequested || row.status === 'cancelled') {
      throw conflict('study_cancelled', 'The study was cancelled; duplicate it to compute its cells again.');
    }
  }

  async function removeQueuedJobs(cellIds: string[]): Promise<void> {
    // The cells are already cancelled, so a worker that takes a job anyway skips it; removal only tidies.
    await Promise.all(cellIds.map((cellId) => discardJob(computeQueue, studyCellJobId(cellId))));
  }

  async function spectraOf(row: StudyWithAuthor, cells: StudyCellRow[]): Promise<StudySpectrum[]> {
    const firstPerN = new Map<number, StudyCellRow>();
    for (const c of cells) if (c.status === 'done' && !firstPerN.has(c.requestedN)) firstPerN.set(c.requestedN, c);
    const chosen = [...firstPerN.values()].sort((a, b) => a.requestedN - b.requestedN);
    const stored = await studies.eigenvaluesOfCells(m, chosen.map((c) => c.id));
    const request = storedRequest(row);
    const cutting = new Set(request.rules.filter((r) => r.truncation.rule !== 'none').map((r) => studyRuleKey(r)));
    return chosen
      .filter((c) => stored.has(c.id))
      .map((c) => ({
        N: c.requestedN,
        seed: c.seed,
        elements: c.n!,
        eigenvalues: Array.from(decodeFloat64(stored.get(c.id)!)),
        cuts: (c.result?.states ?? []).filter((s) => cutting.has(s.rule)).map((s) => ({ rule: s.rule, cutoff: s.cutoff })),
      }));
  }

  async function exportInput(row: StudyWithAuthor): Promise<StudyExportInput> {
    const cells = await studies.cellsOfStudy(m, row.id);
    const entropies = entropiesOf(row, cells);
    const aggregates = aggregateEntropies(entropies);
    return {
      id: row.id,
      title: row.title,
      status: row.status,
      author: row.authorName,
      createdAt: row.createdAt.toISOString(),
      finishedAt: row.finishedAt ? row.finishedAt.toISOString() : null,
      request: storedRequest(row),
      causalSets: row.causalSets ?? [],
      subregions: row.subregions,
      entropies,
      aggregates,
      fits: fitAggregates(aggregates),
      cells: cells.map((c) => ({
        id: c.id,
        N: c.requestedN,
        seed: c.seed,
        status: c.status,
        elements: c.n,
        backend: c.backend,
        engineVersion: c.engineVersion,
        startedAt: c.startedAt ? c.startedAt.toISOString() : null,
        finishedAt: c.finishedAt ? c.finishedAt.toISOString() : null,
        timings: c.result?.timings ?? null,
        states: c.result?.states ?? null,
        error: c.error,
      })),
    };
  }

  async function insertSprinkled(team: TeamContext, author: UserRow, request: Extract<CreateStudyRequest, { source: 'sprinkled' }>) {
    let subregions;
    let cells;
    try {
      subregions = resolveSubregions(request);
      cells = planCells(request, subregions);
      const smallest = Math.min(...request.counts);
      // a Poisson cell draws its N: refuse only what its largest plausible N (mean + 5σ) cannot serve
      checkRulesFit(request.rules, request.process === 'poisson' ? Math.ceil(smallest + 5 * Math.sqrt(smallest)) : smallest, request.process !== 'poisson');
    } catch (error) {
      if (error instanceof StudyPlanError) throw planIssue(error);
      throw error;
    }
    for (const count of new Set(request.counts)) {
      engineCheck(`N = ${count}`, { source: { kind: 'sprinkling', sprinkling: cellSprinkling(request, count, request.seeds[0]!) }, mass: request.mass });
    }
    return studies.insertStudyWithCells(
      m,
      {
        teamId: team.id,
        authorId: author.id,
        title: request.title || null,
        request: request as unknown as Record<string, unknown>,
        subregions,
        regionKind: request.region.kind,
      },
      cells.map((c) => ({ position: c.position, requestedN: c.count, seed: c.seed })),
    );
  }

  /**
   * A study over imported causal sets of the team: every set is loaded and checked like a run on it
   * would be, and each cell gets its own copy of its set's stored elements.
   */
  async function insertImported(team: TeamContext, author: UserRow, request: ImportedStudyRequest) {
    const loaded = await loadStudySets(m, team.id, request.causalSetIds);
    const planned: PlannedCausalSet[] = loaded.map((l) => ({ reference: l.reference, points: l.points }));
    let subregions;
    let cells;
    try {
      subregions = resolveImportedSubregions(request, planned);
      cells = planImportedCells(planned, subregions, request);
      checkRulesFit(request.rules, Math.min(...planned.map((p) => p.reference.N)), true);
    } catch (error) {
      if (error instanceof StudyPlanError) throw planIssue(error);
      throw error;
    }
    for (const l of loaded) {
      const r = l.reference;
      const density = r.density !== null ? { density: r.density } : {};
      const source =
        r.kind === 'relations'
          ? { kind: 'order' as const, causal: l.relationWords!, count: r.N, dimension: r.dimension, ...density }
          : { kind: 'points' as const, points: l.points!, dimension: r.dimension, ...(r.region ? { region: r.region } : density) };
      engineCheck(`"${r.name}"`, { source, mass: request.mass });
    }
    const byId = new Map(loaded.map((l) => [l.reference.id, l]));
    const ordered = cells.map((c) => byId.get(c.seed)!);
    return studies.insertStudyWithCells(
      m,
      {
        teamId: team.id,
        authorId: author.id,
        title: request.title || null,
        request: { ...request, causalSetIds: request.causalSetIds.map((id) => id.toLowerCase()) } as unknown as Record<string, unknown>,
        subregions,
        regionKind: 'imported',
        causalSets: ordered.map((l) => l.reference),
      },
      cells.map((c, k) => ({ position: c.position, requestedN: c.count, seed: c.seed, elements: ordered[k]!.elements })),
    );
  }

  return {
    async create(team: TeamContext, author: UserRow, body: unknown): Promise<{ id: string }> {
      const request = createStudyRequestSchema.parse(body);
      const { id, cellIds } = request.source === 'imported' ? await insertImported(team, author, request) : await insertSprinkled(team, author, request);
      try {
        await enqueueJobs(
          computeQueue,
          'study-cell',
          cellIds.map((cellId) => ({ studyId: id, cellId })),
        );
      } catch (error) {
        const reason = `The study could not be queued: ${(error as Error).message}`;
        await studies.failStudy(m, id, reason);
        await removeQueuedJobs(cellIds);
        throw new HttpError(503, 'queue_unavailable', `${reason}. It is stored as failed; try again when the queue is back.`);
      }
      return { id };
    },

    async list(team: TeamContext, query: ListStudiesQuery = {}): Promise<{ items: StudySummary[] }> {
      const rows = await studies.listStudiesOfTeam(m, team.id, query);
      const progress = await studies.progressOfStudies(m, rows.map((r) => r.id));
      const queue = await readQueueSnapshot(computeQueue);
      // only a queued or running study has a queue position or time left, so only those need their cells
      const timings = await Promise.all(
        rows.map(async (r) => studyTiming(r, r.status === 'queued' || r.status === 'running' ? await studies.cellsOfStudy(m, r.id) : [], queue)),
      );
      return { items: rows.map((r, i) => toStudySummary(r, progress.get(r.id)!, timings[i]!)) };
    },

    async get(team: TeamContext, id: string): Promise<StudyDetail> {
      const row = await findOrThrow(team, id);
      const cells = await studies.cellsOfStudy(m, row.id);
      const progress = (await studies.progressOfStudies(m, [row.id])).get(row.id)!;
      const entropies = entropiesOf(row, cells);
      const aggregates = aggregateEntropies(entropies);
      const request = storedRequest(row);
      const backends = [...new Set(cells.map((c) => c.backend).filter((b): b is string => b !== null))];
      return {
        ...toStudySummary(row, progress, studyTiming(row, cells, await readQueueSnapshot(computeQueue))),
        request: row.request,
        error: row.error,
        cancelRequested: row.cancelRequested,
        subregions: row.subregions,
        causalSets: row.causalSets ?? [],
        ruleLabels: ruleLabels(request),
        cautions: studyCautions({ request, causalSets: row.causalSets ?? [] }),
        cells: cells.map((c) => ({
          id: c.id,
          N: c.requestedN,
          seed: c.seed,
          status: c.status,
          percent: c.percent,
          elements: c.n,
          error: c.error,
          seconds: c.startedAt && c.finishedAt ? (c.finishedAt.getTime() - c.startedAt.getTime()) / 1000 : null,
        })),
        aggregates,
        fits: fitAggregates(aggregates),
        spectra: await spectraOf(row, cells),
        engineVersion: cells.find((c) => c.engineVersion)?.engineVersion ?? null,
        backends,
      };
    },

    async cancel(team: TeamContext, id: string): Promise<StudyDetail> {
      const row = await findOrThrow(team, id);
      const queued = await studies.cancelStudy(m, team.id, row.id);
      if (queued === null) throw conflict('study_finished', `The study is already ${row.status}; only queued or running studies can be cancelled.`);
      await removeQueuedJobs(queued);
      return this.get(team, id);
    },

    /** Queues one failed cell again; the study runs until it has ended, then its aggregates and fits include it. */
    async retryCell(team: TeamContext, id: string, cellId: string): Promise<{ cellIds: string[] }> {
      const row = await findOrThrow(team, id);
      const cell = await cellOrThrow(row, cellId);
      requireOpenToMore(row);
      if (cell.status !== 'failed') {
        throw conflict('cell_not_failed', `The cell N = ${cell.requestedN}, seed ${cell.seed} is ${cell.status}; only a failed cell can be retried.`);
      }
      const queued = await requeue(row, [cell], [cell.id]);
      if (queued.cellIds.length === 0) throw conflict('cell_not_failed', `The cell N = ${cell.requestedN}, seed ${cell.seed} is no longer failed; only a failed cell can be retried.`);
      return queued;
    },

    /** Queues every failed cell of the study again. */
    async retryFailedCells(team: TeamContext, id: string): Promise<{ cellIds: string[] }> {
      const row = await findOrThrow(team, id);
      requireOpenToMore(row);
      const failed = (await studies.cellsOfStudy(m, row.id)).filter((c) => c.status === 'failed');
      if (failed.length === 0) throw conflict('no_failed_cells', `The study is ${row.status} and has no failed cell to retry.`);
      return requeue(row, failed, null);
    },

    /**
     * More N values and/or seeds for a study over sprinklings: the grown request is checked like a new
     * one (the same limits, the cell limit on the total), the missing (N, seed) cells are planned by
     * server/studies/plan.ts and queued, and the study runs again until they have ended.
     */
    async extend(team: TeamContext, id: string, body: unknown): Promise<{ cellIds: string[] }> {
      // another team's study answers 404 whatever the body says
      const row = await findOrThrow(team, id);
      const added = extendStudyRequestSchema.parse(body);
      const request = storedRequest(row);
      if (request.source !== 'sprinkled') {
        throw conflict('study_imported', 'A study over imported causal sets has no N values or seeds to add; duplicate it and pick more causal sets.');
      }
      requireOpenToMore(row);
      const seeds = added.seeds ?? (added.seedCount !== undefined ? nextSeeds(request.seeds, added.seedCount) : []);
      const existing = (await studies.cellsOfStudy(m, row.id)).map((c) => ({ position: c.position, count: c.requestedN, seed: c.seed }));
      let plan;
      try {
        plan = planExtension(request as SprinkledStudyRequest, row.subregions, existing, { counts: added.counts, seeds });
      } catch (error) {
        if (error instanceof StudyPlanError) throw planIssue(error);
        throw error;
      }
      // the grown study within every limit of a new one (at most 12 N, 64 seeds, STUDY_MAX_CELLS cells)
      const grown = sprinkledStudyRequestSchema.parse(plan.request);
      for (const count of added.counts) {
        engineCheck(`N = ${count}`, { source: { kind: 'sprinkling', sprinkling: cellSprinkling(grown, count, grown.seeds[0]!) }, mass: grown.mass });
      }
      const cellIds = await studies.addCellsToStudy(
        m,
        row.id,
        plan.request as unknown as Record<string, unknown>,
        plan.cells.map((c) => ({ position: c.position, requestedN: c.count, seed: c.seed })),
      );
      if (cellIds === null) throw conflict('study_cancelled', 'The study was cancelled; duplicate it to compute its cells again.');
      await enqueueCells(row.id, cellIds);
      return { cellIds };
    },

    /**
     * A finished cell opened as a vacuum run: the cell's own sprinkling (or imported set), mass, one of
     * its subregions and one of its rules, on the dense engine the cell ran on, so the run's S is the
     * cell's and its page adds the diagnostics, spectrum and points. The run keeps its origin.
     */
    async cellAsRun(team: TeamContext, author: UserRow, id: string, cellId: string, body: unknown): Promise<{ id: string }> {
      const row = await findOrThrow(team, id);
      const cell = await cellOrThrow(row, cellId);
      const asked = studyCellRunRequestSchema.parse(body);
      if (cell.status !== 'done') {
        throw conflict('cell_not_done', `The cell N = ${cell.requestedN}, seed ${cell.seed} is ${cell.status}; a cell opens as a run once it is done.`);
      }
      const request = storedRequest(row);
      const subregion = row.subregions.find((s) => s.key === asked.subregion);
      if (!subregion) {
        const message = `the study has no subregion "${asked.subregion}"; it has ${row.subregions.map((s) => `"${s.key}"`).join(', ')}`;
        throw new HttpError(422, 'invalid_request', message, [{ path: 'subregion', message }]);
      }
      const rule = request.rules.find((r) => studyRuleKey(r) === asked.rule);
      if (!rule) {
        const message = `the study has no cut rule "${asked.rule}"; it has ${request.rules.map((r) => `"${studyRuleKey(r)}"`).join(', ')}`;
        throw new HttpError(422, 'invalid_request', message, [{ path: 'rule', message }]);
      }
      const pair = pairSubregions(subregion);
      const name = row.title || `Study ${row.id.slice(0, 8)}`;
      const runBody = {
        title: `${name}: N = ${cell.requestedN}, seed ${cell.seed}, ${subregion.label}, ${studyRuleLabel(rule)}`.slice(0, 200),
        ...(request.source === 'sprinkled' ? { sprinkling: cellSprinkling(request, cell.requestedN, cell.seed) } : { causalSetId: cell.seed }),
        mass: request.mass,
        truncation: rule.truncation,
        doubleTruncation: rule.doubleTruncation,
        ...(rule.restrictedCut ? { restrictedCut: rule.restrictedCut } : {}),
        // the cell ran on the dense engine; auto could pick the structured one for a large N
        engine: 'dense',
        ...(pair ? { mutualInformation: pair } : { subregion: engineSubregion(subregion), ...(request.renyi ? { renyi: request.renyi } : {}) }),
      };
      const origin: RunOrigin = {
        kind: 'study-cell',
        studyId: row.id,
        studyTitle: row.title,
        cellId: cell.id,
        N: cell.requestedN,
        seed: cell.seed,
        subregion: subregion.key,
        subregionLabel: subregion.label,
        rule: asked.rule,
      };
      return runService.create(team, author, runBody, origin);
    },

    async remove(team: TeamContext, id: string): Promise<void> {
      const row = await findOrThrow(team, id);
      const queued = await studies.cancelStudy(m, team.id, row.id);
      if (queued) await removeQueuedJobs(queued);
      if (!(await studies.deleteStudy(m, team.id, row.id))) throw notFound('Study not found.');
    },

    /** One export of a study: body, content type and the attachment's file name. */
    async exportStudy(team: TeamContext, id: string, format: StudyExportFormat): Promise<ExportFile> {
      const row = await findOrThrow(team, id);
      const input = await exportInput(row);
      if (input.entropies.length === 0) {
        throw conflict('study_not_ready', `The study is ${row.status} and no sprinkling has finished yet; exports need at least one.`);
      }
      return exportFile('study', row.id, format, studyRenderers[format](input));
    },
  };
}
