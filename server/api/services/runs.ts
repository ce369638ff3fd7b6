import { randomBytes } from 'node:crypto';
import type { Queue } from 'bullmq';
import type { DataSource } from 'typeorm';
import {
  createRunRequestSchema,
  type CreateRunRequest,
  reanalyseRunRequestSchema,
  type ListRunsQuery,
  type RunDetail,
  type RunOrigin,
  type RunPoints,
  type RunResult,
  type RunSummary,
} from '@shared/runs';
import type { RunExportFormat, RunSpectrumExport } from '@shared/exports';
import { effectiveRestrictedCut, entropyRuleLabel, formatRestrictedCut, formatTruncationRule, ruleCautions } from '@shared/vacuum';
import { decodeFloat64, decodeInt32, decodeRelationWords } from '../../db/codecs';
import * as runs from '../../db/repositories/runs';
import type { RunWithAuthor } from '../../db/repositories/runs';
import type { UserRow } from '../../db/entities';
import { loadCausalSetRunInput } from './causalSets';
import { EngineInputError, makeRegion, validateVacuumRequest, type VacuumRequest } from '../../engine/index';
import { subregionElements } from '../../engine/entropy';
import { continuumSpectrumFor } from '../../engine/regions';
import { discardJob, enqueueJob, vacuumRunJobId } from '../../queue/jobs';
import { continuumRegionKind, toEngineRequest, type StoredRunRequest } from '../../runs/request';
import { exportFile, runRenderers, type ExportFile } from '../../exports/index';
import { entropiesExport } from '../../exports/runs';
import type { TeamContext } from '../context';
import { conflict, HttpError, notFound } from '../errors';
import { readQueueSnapshot, runTiming, type QueueSnapshot } from './queueStatus';
import type { RenderedExportCache } from './renderedExports';

const uuidPattern = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

/**
 * EngineInputError → 422 before anything is stored or queued, with the setting at fault as the issue's
 * path when the engine names one (the request body uses the engine's names: subregion, truncation,
 * engine, mass); an engine size limit gets its own code so the form can say so beside N.
 */
function validateForEngine(request: Omit<VacuumRequest, 'backend'>): void {
  try {
    validateVacuumRequest(request);
  } catch (error) {
    if (error instanceof EngineInputError) {
      const tooLarge = /exceeds the (dense|structured) limit/.test(error.message);
      const issues = error.field ? [{ path: error.field, message: error.message }] : undefined;
      throw new HttpError(422, tooLarge ? 'too_large' : 'invalid_request', error.message, issues);
    }
    throw error;
  }
}

const id8 = (id: string) => id.slice(0, 8);

/** The restricted cut a stored run applies, in short text form; null without double truncation. */
function restrictedCutOf(request: StoredRunRequest): string | null {
  const cut = request.subregion || request.mutualInformation ? effectiveRestrictedCut({ truncation: request.truncation, doubleTruncation: request.doubleTruncation, restrictedCut: request.restrictedCut }) : null;
  return cut ? formatRestrictedCut(cut) : null;
}

/**
 * The stored request of a run, with `retryOf` when it was started by Retry from a failed or cancelled
 * run (provenance, like a re-analysis's `reusedPoints`; the engine request ignores it).
 */
type StoredRunWithRetry = StoredRunRequest & { retryOf?: string };

const retryOfRun = (row: Pick<RunWithAuthor, 'request'>) => (row.request as unknown as StoredRunWithRetry).retryOf ?? null;

/** A seed of eight hex digits that differs from `old`. */
function freshSeed(old: string): string {
  for (;;) {
    const seed = randomBytes(4).toString('hex');
    if (seed !== old) return seed;
  }
}

export function toRunSummary(row: RunWithAuthor, queue: QueueSnapshot, now: Date = new Date()): RunSummary {
  return {
    id: row.id,
    title: row.title,
    status: row.status,
    stage: row.stage,
    percent: row.percent,
    author: { id: row.authorId, name: row.authorName },
    createdAt: row.createdAt.toISOString(),
    startedAt: row.startedAt ? row.startedAt.toISOString() : null,
    finishedAt: row.finishedAt ? row.finishedAt.toISOString() : null,
    dimension: row.dimension,
    regionKind: row.regionKind,
    N: row.n ?? row.requestedN,
    truncation: row.truncationText,
    restrictedCut: restrictedCutOf(row.request as unknown as StoredRunRequest),
    S: row.entropyS,
    parentRunId: row.parentRunId,
    retryOfRunId: retryOfRun(row),
    timing: runTiming(row, queue, now),
  };
}

/** The field settings of a POST body as a run stores them (absent options stay absent). */
function storedSettings(request: CreateRunRequest): Omit<StoredRunRequest, 'sprinkling' | 'causalSet' | 'reusedPoints'> {
  return {
    ...(request.title ? { title: request.title } : {}),
    mass: request.mass,
    truncation: request.truncation,
    ...(request.subregion ? { subregion: request.subregion } : {}),
    doubleTruncation: request.doubleTruncation,
    ...(request.restrictedCut ? { restrictedCut: request.restrictedCut } : {}),
    ...(request.engine ? { engine: request.engine } : {}),
    ...(request.renyi ? { renyi: request.renyi } : {}),
    ...(request.mutualInformation ? { mutualInformation: request.mutualInformation } : {}),
    ...(request.complement ? { complement: true } : {}),
  };
}

export type RunService = ReturnType<typeof createRunService>;

/**
 * The exports of a run that read only what the worker stored when it finished, so that once the run is
 * done they can be kept rendered (renderedExports.ts); run.json and numbers.tex also carry the title
 * and notes, which a team may edit later.
 */
const exportsFixedWhenDone = new Set<RunExportFormat>(['points.csv', 'spectrum.csv', 'spectrum.json']);

export function createRunService(deps: { dataSource: DataSource; computeQueue: Queue; renderedExports?: RenderedExportCache }) {
  const { dataSource, computeQueue, renderedExports } = deps;
  const m = dataSource.manager;

  async function findOrThrow(team: TeamContext, id: string): Promise<RunWithAuthor> {
    const row = uuidPattern.test(id) ? await runs.findRunInTeam(m, team.id, id.toLowerCase()) : null;
    if (!row) throw notFound('Run not found.');
    return row;
  }

  /** Stores the row, then enqueues; if the queue refuses, the row is marked failed with the reason. */
  async function storeAndEnqueue(values: runs.NewRun): Promise<string> {
    const id = await runs.insertRun(m, values);
    try {
      await enqueueJob(computeQueue, 'vacuum-run', { runId: id });
    } catch (error) {
      const reason = `The run could not be queued: ${(error as Error).message}`;
      await runs.failRun(m, id, reason);
      throw new HttpError(503, 'queue_unavailable', `${reason}. It is stored as failed; try again when the queue is back.`);
    }
    return id;
  }

  async function detail(row: RunWithAuthor): Promise<RunDetail> {
    const queue = await readQueueSnapshot(computeQueue);
    let result: RunResult | null = null;
    if (row.status === 'done' && row.summary) {
      const arrays = await runs.loadRunArrays(m, row.teamId, row.id, ['eigenvalues', 'generalizedEigenvalues']);
      const eigenvalues = Array.from(decodeFloat64(arrays!.eigenvalues!));
      const s = row.summary;
      result = {
        N: row.n!,
        density: s.density,
        volume: s.volume,
        relations: s.relations,
        links: s.links,
        eigenvalues,
        continuum: continuumFor(row, eigenvalues.length),
        cutoff: s.cutoff,
        modesKept: s.modesKept,
        knee: (s.knee ?? null) as RunResult['knee'],
        diagnostics: s.diagnostics as RunResult['diagnostics'],
        cautions: s.cautions ?? ruleCautions(row.dimension, row.request as unknown as StoredRunRequest),
        entropy: s.entropy
          ? {
              ...s.entropy,
              // runs stored before the restricted cut was a setting cut at √n/(4π) when doubly truncated
              restrictedCut: s.entropy.restrictedCut !== undefined ? s.entropy.restrictedCut : s.entropy.doubleTruncation ? { rule: 'sqrtN' } : null,
              generalizedEigenvalues: arrays!.generalizedEigenvalues ? Array.from(decodeFloat64(arrays!.generalizedEigenvalues)) : [],
              renyi: s.entropy.renyi ?? null,
            }
          : null,
        mutualInformation: s.mutualInformation ?? null,
        complement: s.complement ?? null,
        manifold: s.manifold ?? null,
        backend: row.backend ?? '',
        engineVersion: row.engineVersion ?? '',
        timings: s.timings,
        ...(s.engine ? { engine: s.engine } : {}),
        ...(s.engineReason ? { engineReason: s.engineReason } : {}),
      };
    }
    return {
      ...toRunSummary(row, queue),
      request: row.request,
      error: row.error,
      cancelRequested: row.cancelRequested,
      result,
    };
  }

  function continuumFor(row: RunWithAuthor, count: number): number[] | null {
    const kind = continuumRegionKind(row.regionKind, row.request as unknown as StoredRunRequest);
    const continuum = row.n && kind ? continuumSpectrumFor(kind, row.n, count) : null;
    return continuum ? Array.from(continuum) : null;
  }

  async function removeQueuedJob(id: string): Promise<void> {
    // The row is already cancelled, so a worker that takes the job anyway skips it; removal only tidies.
    await discardJob(computeQueue, vacuumRunJobId(id));
  }

  function requireDone(row: RunWithAuthor): RunWithAuthor {
    if (row.status !== 'done') {
      throw conflict('run_not_done', `The run is ${row.status}; its spectrum and points are available once it is done.`);
    }
    return row;
  }

  async function doneRunWithArrays(team: TeamContext, id: string) {
    return requireDone(await findOrThrow(team, id));
  }

  async function pointsOf(row: RunWithAuthor): Promise<RunPoints> {
    const arrays = await runs.loadRunArrays(m, row.teamId, row.id, ['points', 'subregionElements']);
    if (!arrays?.points) {
      throw conflict('points_not_ready', `The run is ${row.status}; its points are stored once it has sprinkled them.`);
    }
    const flat = decodeFloat64(arrays.points);
    const d = row.dimension;
    const points: number[][] = [];
    for (let i = 0; i < flat.length / d; i++) points.push(Array.from(flat.subarray(i * d, (i + 1) * d)));
    return {
      dimension: d,
      columns: d === 2 ? ['t', 'x'] : ['t', 'x', 'y', 'z'],
      points,
      subregionElements: arrays.subregionElements ? Array.from(decodeInt32(arrays.subregionElements)) : null,
      pairElements: pairElementsOf(row.request as unknown as StoredRunRequest, flat, d),
    };
  }

  /**
   * A and B of the run's pair, found again from the request: the engine's own membership rule for tips
   * (cheap beside the run), the listed labels otherwise; so the row keeps no second copy of them.
   */
  function pairElementsOf(request: StoredRunRequest, points: Float64Array, dimension: 2 | 4): RunPoints['pairElements'] {
    const pair = request.mutualInformation;
    if (!pair) return null;
    const region = request.sprinkling?.region ?? request.causalSet?.region ?? null;
    const periodX = region ? makeRegion(region).periodX : undefined;
    const members = (spec: typeof pair.a) => Array.from(subregionElements(spec, points, dimension, periodX));
    try {
      return { a: members(pair.a), b: members(pair.b) };
    } catch {
      // a label beyond N (refused before the run, so only a stored run of an older check) shows no pair
      return null;
    }
  }

  async function spectrumOf(row: RunWithAuthor): Promise<RunSpectrumExport> {
    requireDone(row);
    const arrays = await runs.loadRunArrays(m, row.teamId, row.id, ['eigenvalues']);
    const eigenvalues = Array.from(decodeFloat64(arrays!.eigenvalues!));
    const summary = row.summary!;
    const request = row.request as unknown as StoredRunRequest;
    const entropies = entropiesExport(
      {
        entropy: summary.entropy ? { ...summary.entropy, generalizedEigenvalues: [] } : null,
        mutualInformation: summary.mutualInformation ?? null,
        complement: summary.complement ?? null,
      },
      entropyRuleLabel(request),
    );
    return {
      eigenvalues,
      continuum: continuumFor(row, eigenvalues.length),
      cutoff: summary.cutoff,
      modesKept: summary.modesKept,
      N: row.n!,
      ...(entropies ? { entropies } : {}),
    };
  }

  return {
    /** `origin`: set by the server when the run is opened from a study cell, stored beside the request. */
    async create(team: TeamContext, author: UserRow, body: unknown, origin?: RunOrigin): Promise<{ id: string }> {
      const request = createRunRequestSchema.parse(body);
      if (request.causalSetId !== undefined) {
        const imported = await loadCausalSetRunInput(m, team.id, request.causalSetId);
        if (!imported) throw new HttpError(422, 'invalid_request', `No imported causal set ${request.causalSetId} exists in this team.`);
        const stored: StoredRunRequest = {
          ...storedSettings(request),
          causalSet: imported.reference,
        };
        validateForEngine(toEngineRequest(stored, imported.dimension, imported.points, imported.relationWords));
        return {
          id: await storeAndEnqueue({
            teamId: team.id,
            authorId: author.id,
            title: request.title || null,
            request: { ...stored, ...(origin ? { origin } : {}) } as unknown as Record<string, unknown>,
            dimension: imported.dimension,
            regionKind: 'imported',
            requestedN: imported.n,
            truncationText: formatTruncationRule(request.truncation),
            parentRunId: null,
            points: imported.stored.points,
            relation: imported.stored.relation,
          }),
        };
      }
      if (!request.sprinkling) throw new HttpError(422, 'invalid_request', 'Give a sprinkling or the id of an imported causal set.');
      const sprinkling = request.sprinkling;
      const stored: StoredRunRequest = {
        ...storedSettings(request),
        sprinkling,
      };
      validateForEngine(toEngineRequest(stored, 2, null));
      const region = makeRegion(sprinkling.region);
      const expectedN = sprinkling.count ?? Math.round((sprinkling.density as number) * region.volume);
      return {
        id: await storeAndEnqueue({
          teamId: team.id,
          authorId: author.id,
          title: request.title || null,
          request: { ...stored, ...(origin ? { origin } : {}) } as unknown as Record<string, unknown>,
          dimension: region.dimension,
          regionKind: sprinkling.region.kind,
          requestedN: expectedN,
          truncationText: formatTruncationRule(request.truncation),
          parentRunId: null,
        }),
      };
    },

    async list(team: TeamContext, query: ListRunsQuery): Promise<{ items: RunSummary[]; total: number; page: number; pageSize: number }> {
      const { rows, total } = await runs.listRunsOfTeam(m, team.id, query);
      const queue = await readQueueSnapshot(computeQueue);
      const now = new Date();
      return { items: rows.map((row) => toRunSummary(row, queue, now)), total, page: query.page, pageSize: query.pageSize };
    },

    async get(team: TeamContext, id: string): Promise<RunDetail> {
      return detail(await findOrThrow(team, id));
    },

    async cancel(team: TeamContext, id: string): Promise<RunDetail> {
      const row = await findOrThrow(team, id);
      if (await runs.cancelQueuedRun(m, team.id, row.id)) {
        await removeQueuedJob(row.id);
      } else if (!(await runs.requestCancelOfRunningRun(m, team.id, row.id))) {
        const now = await findOrThrow(team, id);
        throw conflict('run_finished', `The run is already ${now.status}; only queued or running runs can be cancelled.`);
      }
      return detail(await findOrThrow(team, id));
    },

    async remove(team: TeamContext, id: string): Promise<void> {
      const row = await findOrThrow(team, id);
      // A queued run is cancelled first so no worker starts it; a running one notices the missing row.
      if (await runs.cancelQueuedRun(m, team.id, row.id)) await removeQueuedJob(row.id);
      else await runs.requestCancelOfRunningRun(m, team.id, row.id);
      if (!(await runs.deleteRun(m, team.id, row.id))) throw notFound('Run not found.');
    },

    async reanalyse(team: TeamContext, author: UserRow, id: string, body: unknown): Promise<{ id: string }> {
      const changes = reanalyseRunRequestSchema.parse(body);
      const parent = await doneRunWithArrays(team, id);
      const arrays = await runs.loadRunArrays(m, team.id, parent.id, ['points', 'relation']);
      if (!arrays?.points) throw conflict('points_missing', 'The run has no stored points to re-analyse.');
      const base = parent.request as unknown as StoredRunRequest;
      const subregion = changes.subregion === null ? undefined : (changes.subregion ?? base.subregion);
      const mutualInformation = changes.mutualInformation === null ? undefined : (changes.mutualInformation ?? base.mutualInformation);
      // a parent's double truncation lapses with its subregion and pair unless asked for again
      const doubleTruncation = changes.doubleTruncation ?? (subregion || mutualInformation ? base.doubleTruncation : false);
      // the restricted cut carries over with double truncation; null asks for the default √n/(4π)
      const restrictedCut = !doubleTruncation ? undefined : changes.restrictedCut === null ? undefined : (changes.restrictedCut ?? base.restrictedCut);
      // the parent's Rényi orders and complement check describe its subregion and lapse with it (asked
      // for again without one, the engine's check refuses them); the pair stands alone
      const renyi = changes.renyi === null ? undefined : (changes.renyi ?? (subregion ? base.renyi : undefined));
      const complement = changes.complement ?? (subregion ? (base.complement ?? false) : false);
      const title = changes.title || (parent.title ? `${parent.title} (re-analysis)` : `Re-analysis of ${id8(parent.id)}`);
      const stored: StoredRunRequest = {
        title,
        mass: changes.mass ?? base.mass,
        truncation: changes.truncation ?? base.truncation,
        ...(subregion ? { subregion } : {}),
        doubleTruncation,
        ...(restrictedCut ? { restrictedCut } : {}),
        ...(base.sprinkling ? { sprinkling: base.sprinkling } : {}),
        ...(base.causalSet ? { causalSet: base.causalSet } : {}),
        // the parent's engine request carries over unless the change names one (the rule may still
        // pick another engine for the new cut under auto)
        ...((changes.engine ?? base.engine) ? { engine: changes.engine ?? base.engine } : {}),
        ...(renyi ? { renyi } : {}),
        ...(mutualInformation ? { mutualInformation } : {}),
        ...(complement ? { complement } : {}),
        reusedPoints: { runId: parent.id, N: parent.n!, density: parent.summary?.density ?? null },
      };
      validateForEngine(
        toEngineRequest(stored, parent.dimension, decodeFloat64(arrays.points), arrays.relation ? decodeRelationWords(arrays.relation, parent.n!) : null),
      );
      return {
        id: await storeAndEnqueue({
          teamId: team.id,
          authorId: author.id,
          title,
          request: stored as unknown as Record<string, unknown>,
          dimension: parent.dimension,
          regionKind: parent.regionKind,
          requestedN: parent.n,
          truncationText: formatTruncationRule(stored.truncation),
          parentRunId: parent.id,
          points: arrays.points,
          relation: arrays.relation,
        }),
      };
    },

    /**
     * Retry: a failed or cancelled run's stored request queued again as a new run that records `retryOf`,
     * so the failed record stays as it was. The elements a run on an imported set or a re-analysis
     * carries in its row are copied; a sprinkling is made again from the same seed.
     */
    async retry(team: TeamContext, author: UserRow, id: string): Promise<{ id: string }> {
      const original = await findOrThrow(team, id);
      if (original.status !== 'failed' && original.status !== 'cancelled') {
        const hint = original.status === 'done' ? ' For another sprinkling with the same settings use “Same settings, new seed”.' : '';
        throw conflict('run_not_retryable', `The run is ${original.status}; only failed or cancelled runs can be retried.${hint}`);
      }
      const { retryOf: _earlier, ...request } = original.request as unknown as StoredRunWithRetry;
      const carriesElements = Boolean(request.causalSet || request.reusedPoints);
      const arrays = carriesElements ? await runs.loadRunArrays(m, team.id, original.id, ['points', 'relation']) : null;
      const points = arrays?.points ? decodeFloat64(arrays.points) : null;
      const relation = arrays?.relation && request.causalSet ? decodeRelationWords(arrays.relation, request.causalSet.N) : null;
      validateForEngine(toEngineRequest(request, original.dimension, points, relation));
      const stored: StoredRunWithRetry = { ...request, retryOf: original.id };
      return {
        id: await storeAndEnqueue({
          teamId: team.id,
          authorId: author.id,
          title: original.title,
          request: stored as unknown as Record<string, unknown>,
          dimension: original.dimension,
          regionKind: original.regionKind,
          requestedN: original.requestedN,
          truncationText: original.truncationText,
          parentRunId: original.parentRunId,
          points: arrays?.points ?? null,
          relation: arrays?.relation ?? null,
        }),
      };
    },

    /**
     * Same settings, new seed: the run's settings and sprinkling with a fresh seed, as a new run that
     * sprinkles anew (a re-analysis's settings on a new sprinkling of its region). A run on an imported
     * set has no seed to change.
     */
    async reseed(team: TeamContext, author: UserRow, id: string): Promise<{ id: string; seed: string }> {
      const original = await findOrThrow(team, id);
      // a new sprinkling is no longer the points of a re-analysis's parent, nor of a study's cell
      const { retryOf: _retry, reusedPoints: _reused, origin: _origin, ...request } = original.request as unknown as StoredRunWithRetry & { origin?: unknown };
      if (!request.sprinkling) {
        throw conflict('run_has_no_seed', 'This run is on an imported causal set, which has no seed; import another set, or start a new run from the form.');
      }
      const seed = freshSeed(request.sprinkling.seed);
      const stored: StoredRunRequest = { ...request, sprinkling: { ...request.sprinkling, seed } };
      validateForEngine(toEngineRequest(stored, original.dimension, null));
      const region = makeRegion(stored.sprinkling!.region);
      const sprinkling = stored.sprinkling!;
      return {
        seed,
        id: await storeAndEnqueue({
          teamId: team.id,
          authorId: author.id,
          title: original.title,
          request: stored as unknown as Record<string, unknown>,
          dimension: region.dimension,
          regionKind: sprinkling.region.kind,
          requestedN: sprinkling.count ?? Math.round((sprinkling.density as number) * region.volume),
          truncationText: original.truncationText,
          parentRunId: null,
        }),
      };
    },

    async points(team: TeamContext, id: string): Promise<RunPoints> {
      return pointsOf(await findOrThrow(team, id));
    },

    /** One export of a run: body, content type and the attachment's file name. */
    async exportRun(team: TeamContext, id: string, format: RunExportFormat): Promise<ExportFile> {
      const row = await findOrThrow(team, id);
      const render = () => runRenderers[format]({ points: () => pointsOf(row), spectrum: () => spectrumOf(row), run: () => detail(requireDone(row)) });
      const body =
        renderedExports && row.status === 'done' && exportsFixedWhenDone.has(format)
          ? await renderedExports.get(`${row.teamId}/${row.id}/${format}`, render)
          : await render();
      return exportFile('run', row.id, format, body);
    },
  };
}
