import type { EntityManager } from 'typeorm';
import { StudyCellEntity, StudyEntity, type StudyCellRecord, type StudyCellRow, type StudyRow } from '../study-entities';
import { changedRows } from './runs';

export type StudyWithAuthor = StudyRow & { authorName: string };

export interface StudyProgressCounts {
  done: number;
  failed: number;
  cancelled: number;
  running: number;
  queued: number;
  /** sum of the percent of the running cells */
  runningPercent: number;
}

export type NewStudy = Pick<StudyRow, 'teamId' | 'authorId' | 'title' | 'request' | 'subregions' | 'regionKind'> & Partial<Pick<StudyRow, 'causalSets'>>;

/** The study and its cells in one transaction, so no half-planned study is ever visible. */
export async function insertStudyWithCells(
  m: EntityManager,
  values: NewStudy,
  cells: { position: number; requestedN: number; seed: string; elements?: Buffer | null }[],
): Promise<{ id: string; cellIds: string[] }> {
  return m.transaction(async (t) => {
    const study = await t.save(StudyEntity, t.create(StudyEntity, { ...values, status: 'queued', cellsTotal: cells.length }));
    const saved = await t.save(
      StudyCellEntity,
      cells.map((c) => t.create(StudyCellEntity, { ...c, studyId: study.id, status: 'queued', percent: 0 })),
    );
    return { id: study.id, cellIds: saved.map((c) => c.id) };
  });
}

async function withAuthorWhere(m: EntityManager, where: string, parameters: unknown[]): Promise<StudyWithAuthor[]> {
  const rows: Record<string, unknown>[] = await m.query(
    `SELECT s.*, u.name AS author_name FROM studies s JOIN users u ON u.id = s.author_id WHERE ${where} ORDER BY s.created_at DESC, s.id`,
    parameters,
  );
  return rows.map((r) => ({
    id: r.id as string,
    teamId: r.team_id as string,
    authorId: r.author_id as string,
    title: r.title as string | null,
    status: r.status as StudyRow['status'],
    cancelRequested: r.cancel_requested as boolean,
    request: r.request as Record<string, unknown>,
    subregions: r.subregions as StudyRow['subregions'],
    causalSets: (r.causal_sets as StudyRow['causalSets']) ?? null,
    regionKind: r.region_kind as string,
    cellsTotal: r.cells_total as number,
    error: r.error as string | null,
    createdAt: r.created_at as Date,
    startedAt: r.started_at as Date | null,
    finishedAt: r.finished_at as Date | null,
    authorName: r.author_name as string,
  }));
}

export async function findStudyInTeam(m: EntityManager, teamId: string, id: string): Promise<StudyWithAuthor | null> {
  return (await withAuthorWhere(m, 's.id = $1 AND s.team_id = $2', [id, teamId]))[0] ?? null;
}

export async function findStudyById(m: EntityManager, id: string): Promise<StudyWithAuthor | null> {
  return (await withAuthorWhere(m, 's.id = $1', [id]))[0] ?? null;
}

/** What the studies list may be narrowed by; dates are whole UTC days, `createdTo` included. */
export interface StudyListFilters {
  search?: string;
  status?: StudyRow['status'];
  regionKind?: string;
  authorId?: string;
  createdFrom?: string;
  createdTo?: string;
}

const likePattern = (text: string) => `%${text.replace(/[\\%_]/g, (c) => `\\${c}`)}%`;
const startOfUtcDay = (day: string, plusDays = 0) => new Date(Date.parse(`${day}T00:00:00Z`) + plusDays * 86_400_000);

/** The team's studies, newest first, narrowed by the filters given. */
export function listStudiesOfTeam(m: EntityManager, teamId: string, filters: StudyListFilters = {}): Promise<StudyWithAuthor[]> {
  const where = ['s.team_id = $1'];
  const parameters: unknown[] = [teamId];
  const add = (clause: (placeholder: string) => string, value: unknown) => {
    parameters.push(value);
    where.push(clause(`$${parameters.length}`));
  };
  // the title, or the id as the page shows it (its first characters)
  if (filters.search) add((p) => `(s.title ILIKE ${p} OR s.id::text ILIKE ${p})`, likePattern(filters.search));
  if (filters.status) add((p) => `s.status = ${p}`, filters.status);
  if (filters.regionKind) add((p) => `s.region_kind = ${p}`, filters.regionKind);
  if (filters.authorId) add((p) => `s.author_id = ${p}`, filters.authorId);
  if (filters.createdFrom) add((p) => `s.created_at >= ${p}`, startOfUtcDay(filters.createdFrom));
  if (filters.createdTo) add((p) => `s.created_at < ${p}`, startOfUtcDay(filters.createdTo, 1));
  return withAuthorWhere(m, where.join(' AND '), parameters);
}

/** Cell counts per status (and the running cells' percent) for each study. */
export async function progressOfStudies(m: EntityManager, studyIds: string[]): Promise<Map<string, StudyProgressCounts>> {
  const out = new Map<string, StudyProgressCounts>();
  for (const id of studyIds) out.set(id, { done: 0, failed: 0, cancelled: 0, running: 0, queued: 0, runningPercent: 0 });
  if (studyIds.length === 0) return out;
  const rows: { study_id: string; status: keyof StudyProgressCounts; count: string; percent: number | null }[] = await m.query(
    `SELECT study_id, status, count(*) AS count, sum(percent) AS percent FROM study_cells WHERE study_id = ANY($1::uuid[]) GROUP BY study_id, status`,
    [studyIds],
  );
  for (const r of rows) {
    const counts = out.get(r.study_id)!;
    counts[r.status] = Number(r.count);
    if (r.status === 'running') counts.runningPercent = Number(r.percent ?? 0);
  }
  return out;
}

/** The cells of a study in queue order; the spectra only when asked. */
export async function cellsOfStudy(m: EntityManager, studyId: string, withEigenvalues = false): Promise<StudyCellRow[]> {
  const columns = ['id', 'studyId', 'position', 'requestedN', 'seed', 'status', 'percent', 'n', 'result', 'error', 'engineVersion', 'backend', 'startedAt', 'finishedAt'];
  if (withEigenvalues) columns.push('eigenvalues');
  return (await m
    .createQueryBuilder(StudyCellEntity, 'c')
    .select(columns.map((c) => `c.${c}`))
    .where('c.study_id = :studyId', { studyId })
    .orderBy('c.position', 'ASC')
    .getMany()) as StudyCellRow[];
}

/** Spectra of the given cells. */
export async function eigenvaluesOfCells(m: EntityManager, cellIds: string[]): Promise<Map<string, Buffer>> {
  if (cellIds.length === 0) return new Map();
  const rows: { id: string; eigenvalues: Buffer | null }[] = await m.query(`SELECT id, eigenvalues FROM study_cells WHERE id = ANY($1::uuid[])`, [cellIds]);
  return new Map(rows.filter((r) => r.eigenvalues).map((r) => [r.id, r.eigenvalues!]));
}

/**
 * Stops a queued or running study: the study is cancelled at once, its queued cells too (a worker
 * that takes their jobs skips them), and a running cell sees the flag at its next poll. Returns the
 * ids of the cells that were still queued, or null when the study had already finished.
 */
export async function cancelStudy(m: EntityManager, teamId: string, id: string): Promise<string[] | null> {
  return m.transaction(async (t) => {
    const stopped = await changedRows(
      t,
      `UPDATE studies SET cancel_requested = true, status = 'cancelled', finished_at = now()
        WHERE id = $1 AND team_id = $2 AND status IN ('queued', 'running')`,
      [id, teamId],
    );
    if (!stopped) return null;
    const rows: { id: string }[] = await t.query(
      `UPDATE study_cells SET status = 'cancelled', finished_at = now() WHERE study_id = $1 AND status = 'queued' RETURNING id`,
      [id],
    );
    // TypeORM answers UPDATE … RETURNING with [rows, count]
    const list = Array.isArray(rows[0]) ? (rows[0] as unknown as { id: string }[]) : rows;
    return list.map((r) => r.id);
  });
}

export async function deleteStudy(m: EntityManager, teamId: string, id: string): Promise<boolean> {
  return changedRows(m, `DELETE FROM studies WHERE id = $1 AND team_id = $2`, [id, teamId]);
}

/** Marks a study and its unfinished cells failed when nothing will run them (e.g. the queue refused the jobs). */
export async function failStudy(m: EntityManager, id: string, message: string): Promise<void> {
  await m.transaction(async (t) => {
    await t.query(`UPDATE studies SET status = 'failed', error = $2, finished_at = now() WHERE id = $1 AND status IN ('queued', 'running')`, [id, message]);
    await t.query(`UPDATE study_cells SET status = 'failed', error = $2, finished_at = now() WHERE study_id = $1 AND status IN ('queued', 'running')`, [id, message]);
  });
}

// ---- worker side ----

/** Cells still queued or running that were queued more than `olderThanMs` ago (for the sweep of lost jobs). */
export async function findUnfinishedCells(m: EntityManager, olderThanMs: number): Promise<{ studyId: string; cellId: string }[]> {
  const rows: { id: string; study_id: string }[] = await m.query(
    `SELECT c.id, c.study_id FROM study_cells c JOIN studies s ON s.id = c.study_id
      WHERE c.status IN ('queued', 'running') AND c.queued_at < now() - ($1 || ' milliseconds')::interval`,
    [String(olderThanMs)],
  );
  return rows.map((r) => ({ studyId: r.study_id, cellId: r.id }));
}

/** queued or running → failed, when nothing will ever finish the cell (its job is lost); false if it had ended. */
export async function failCell(m: EntityManager, cellId: string, message: string): Promise<boolean> {
  return changedRows(
    m,
    `UPDATE study_cells SET status = 'failed', error = $2, finished_at = now() WHERE id = $1 AND status IN ('queued', 'running')`,
    [cellId, message],
  );
}

/**
 * Takes a cell for computation: queued, or running again when BullMQ hands out the job of a worker
 * that died (stalled), as long as its study is not cancelled. Marks the study running.
 */
export async function claimCell(m: EntityManager, cellId: string): Promise<{ cell: StudyCellRow; study: StudyRow } | null> {
  const claimed = await changedRows(
    m,
    `UPDATE study_cells c SET status = 'running', started_at = COALESCE(c.started_at, now()), percent = 0
       FROM studies s
      WHERE c.id = $1 AND s.id = c.study_id AND c.status IN ('queued', 'running') AND NOT s.cancel_requested`,
    [cellId],
  );
  if (!claimed) return null;
  const cell = await m.findOneBy(StudyCellEntity, { id: cellId });
  if (!cell) return null;
  // a study closed while this cell was being added or retried opens again: it has a cell computing
  await m.query(
    `UPDATE studies SET status = 'running', started_at = COALESCE(started_at, now()), finished_at = NULL, error = NULL
      WHERE id = $1 AND status IN ('queued', 'done', 'failed') AND NOT cancel_requested`,
    [cell.studyId],
  );
  const study = await m.findOneBy(StudyEntity, { id: cell.studyId });
  return study ? { cell, study } : null;
}

/** A cell's copy of its imported causal set's elements (null for a sprinkled cell). */
export async function cellElements(m: EntityManager, cellId: string): Promise<Buffer | null> {
  const rows: { elements: Buffer | null }[] = await m.query(`SELECT elements FROM study_cells WHERE id = $1`, [cellId]);
  return rows[0]?.elements ?? null;
}

/** The cell as the worker sees it while computing: gone (study deleted), asked to stop, or carry on. */
export async function cellControlState(m: EntityManager, cellId: string): Promise<'deleted' | 'cancel' | 'continue'> {
  const rows: { cancel_requested: boolean; status: string }[] = await m.query(
    `SELECT s.cancel_requested, c.status FROM study_cells c JOIN studies s ON s.id = c.study_id WHERE c.id = $1`,
    [cellId],
  );
  if (rows.length === 0) return 'deleted';
  return rows[0]!.cancel_requested || rows[0]!.status === 'cancelled' ? 'cancel' : 'continue';
}

export async function updateCellProgress(m: EntityManager, cellId: string, percent: number): Promise<void> {
  await m.query(`UPDATE study_cells SET percent = $2 WHERE id = $1 AND status = 'running'`, [cellId, percent]);
}

export interface CellOutcome {
  n: number;
  engineVersion: string;
  backend: string;
  result: StudyCellRecord;
  eigenvalues: Buffer;
}

/** Stores a cell's results in one statement, only while it runs and its study is not cancelled. */
export async function completeCell(m: EntityManager, cellId: string, outcome: CellOutcome): Promise<boolean> {
  return changedRows(
    m,
    `UPDATE study_cells c SET status = 'done', percent = 100, finished_at = now(), error = NULL,
            n = $2, engine_version = $3, backend = $4, result = $5, eigenvalues = $6
       FROM studies s
      WHERE c.id = $1 AND s.id = c.study_id AND c.status = 'running' AND NOT s.cancel_requested`,
    [cellId, outcome.n, outcome.engineVersion, outcome.backend, JSON.stringify(outcome.result), outcome.eigenvalues],
  );
}

export async function markCellCancelled(m: EntityManager, cellId: string): Promise<void> {
  await m.query(
    `UPDATE study_cells SET status = 'cancelled', finished_at = COALESCE(finished_at, now()) WHERE id = $1 AND status IN ('queued', 'running')`,
    [cellId],
  );
}

export async function markCellFailed(m: EntityManager, cellId: string, message: string, engineVersion: string): Promise<boolean> {
  return changedRows(
    m,
    `UPDATE study_cells SET status = 'failed', error = $2, finished_at = now(), engine_version = $3 WHERE id = $1 AND status = 'running'`,
    [cellId, message, engineVersion],
  );
}

/**
 * Closes the study once no cell is queued or running: done when every cell is done, failed (with the
 * first cell error) when any failed. One statement, so two workers finishing the last cells at once
 * cannot both close it. Returns the new status, or null when the study is not finished (or cancelled).
 */
export async function finishStudyIfComplete(m: EntityManager, studyId: string): Promise<'done' | 'failed' | null> {
  const rows = (await m.query(
    `UPDATE studies s
        SET status = CASE WHEN EXISTS (SELECT 1 FROM study_cells c WHERE c.study_id = s.id AND c.status = 'failed') THEN 'failed' ELSE 'done' END,
            error = (SELECT 'cell N = ' || c.requested_n || ', seed ' || c.seed || ': ' || c.error FROM study_cells c
                      WHERE c.study_id = s.id AND c.status = 'failed' ORDER BY c.position LIMIT 1),
            finished_at = now()
      WHERE s.id = $1 AND s.status IN ('queued', 'running') AND NOT s.cancel_requested
        AND NOT EXISTS (SELECT 1 FROM study_cells c WHERE c.study_id = s.id AND c.status IN ('queued', 'running'))
      RETURNING s.status`,
    [studyId],
  )) as unknown[];
  const list = (Array.isArray(rows[0]) ? rows[0] : rows) as { status: 'done' | 'failed' }[];
  return list[0]?.status ?? null;
}

// ---- the daily loop: retry, extend ----

/** A closed study opens again for cells queued anew: queued if it never started, else running. */
const reopenStudy = `UPDATE studies SET status = CASE WHEN started_at IS NULL THEN 'queued' ELSE 'running' END, finished_at = NULL, error = NULL
  WHERE id = $1 AND NOT cancel_requested`;

function returnedIds(rows: unknown): string[] {
  // TypeORM answers UPDATE … RETURNING with [rows, count]
  const list = (Array.isArray(rows) && Array.isArray(rows[0]) ? rows[0] : rows) as { id: string }[];
  return list.map((r) => r.id);
}

/**
 * Queues failed cells of a study again, as if never computed (results, error and times cleared), and
 * opens the study; `cellIds` null takes every failed cell. Returns the ids queued; none when the study
 * is cancelled or no such cell has failed.
 */
export async function requeueFailedCells(m: EntityManager, studyId: string, cellIds: string[] | null): Promise<string[]> {
  return m.transaction(async (t) => {
    const study: { cancel_requested: boolean }[] = await t.query(`SELECT cancel_requested FROM studies WHERE id = $1 FOR UPDATE`, [studyId]);
    if (study.length === 0 || study[0]!.cancel_requested) return [];
    const ids = returnedIds(
      await t.query(
        `UPDATE study_cells SET status = 'queued', percent = 0, error = NULL, n = NULL, result = NULL, eigenvalues = NULL,
                engine_version = NULL, backend = NULL, started_at = NULL, finished_at = NULL, queued_at = now()
          WHERE study_id = $1 AND status = 'failed' AND ($2::uuid[] IS NULL OR id = ANY($2::uuid[]))
          RETURNING id`,
        [studyId, cellIds],
      ),
    );
    if (ids.length > 0) await t.query(reopenStudy, [studyId]);
    return ids;
  });
}

/**
 * Adds planned cells to a study in one transaction with its grown request: the study row is locked, so
 * a worker closing the study at the same moment waits and then sees the new cells. Returns the new
 * cell ids, or null when the study is cancelled (or gone).
 */
export async function addCellsToStudy(
  m: EntityManager,
  studyId: string,
  request: Record<string, unknown>,
  cells: { position: number; requestedN: number; seed: string }[],
): Promise<string[] | null> {
  return m.transaction(async (t) => {
    const study: { cancel_requested: boolean }[] = await t.query(`SELECT cancel_requested FROM studies WHERE id = $1 FOR UPDATE`, [studyId]);
    if (study.length === 0 || study[0]!.cancel_requested) return null;
    const saved = await t.save(
      StudyCellEntity,
      cells.map((c) => t.create(StudyCellEntity, { ...c, studyId, status: 'queued', percent: 0 })),
    );
    await t.query(`UPDATE studies SET request = $2, cells_total = cells_total + $3 WHERE id = $1`, [studyId, JSON.stringify(request), cells.length]);
    await t.query(reopenStudy, [studyId]);
    return saved.map((c) => c.id);
  });
}

/** One cell of a study, or null. */
export async function findCellOfStudy(m: EntityManager, studyId: string, cellId: string): Promise<StudyCellRow | null> {
  return (await m.findOneBy(StudyCellEntity, { id: cellId, studyId })) ?? null;
}
