import type { EntityManager } from 'typeorm';
import type { ListRunsQuery, RunStatus } from '@shared/runs';
import type { VacuumStage } from '@shared/vacuum';
import { RunEntity, type RunRow, type RunSummaryRecord } from '../run-entities';

/** A run with its author's name, as lists and pages show it (the long arrays are loaded only on demand). */
export type RunWithAuthor = Omit<RunRow, 'points' | 'eigenvalues' | 'generalizedEigenvalues' | 'subregionElements' | 'relation'> & {
  authorName: string;
};

export type RunArrayColumn = 'points' | 'eigenvalues' | 'generalizedEigenvalues' | 'subregionElements' | 'relation';

const summaryColumns = [
  'id', 'teamId', 'authorId', 'title', 'status', 'stage', 'percent', 'cancelRequested', 'request', 'dimension',
  'regionKind', 'requestedN', 'n', 'truncationText', 'entropyS', 'error', 'engineVersion', 'backend', 'createdAt',
  'startedAt', 'finishedAt', 'parentRunId', 'summary',
] as const;

/** Runs an UPDATE or DELETE; true when it touched a row (TypeORM answers those with [rows, rowCount]). */
export async function changedRows(m: EntityManager, sql: string, parameters: unknown[]): Promise<boolean> {
  const [, rowCount] = (await m.query(sql, parameters)) as [unknown[], number];
  return rowCount > 0;
}

export type NewRun = Pick<
  RunRow,
  'teamId' | 'authorId' | 'title' | 'request' | 'dimension' | 'regionKind' | 'requestedN' | 'truncationText' | 'parentRunId'
> & { points?: Buffer | null; relation?: Buffer | null };

export async function insertRun(m: EntityManager, values: NewRun): Promise<string> {
  const saved = await m.save(RunEntity, m.create(RunEntity, { ...values, status: 'queued', percent: 0, points: values.points ?? null, relation: values.relation ?? null }));
  return saved.id;
}

function withAuthor(m: EntityManager) {
  return m
    .createQueryBuilder(RunEntity, 'r')
    .select(summaryColumns.map((c) => `r.${c}`))
    .innerJoin('users', 'u', 'u.id = r.author_id')
    .addSelect('u.name', 'author_name');
}

async function oneWithAuthor(query: ReturnType<typeof withAuthor>): Promise<RunWithAuthor | null> {
  const { entities, raw } = await query.getRawAndEntities();
  const row = entities[0];
  return row ? { ...row, authorName: (raw[0] as { author_name: string }).author_name } : null;
}

export function findRunInTeam(m: EntityManager, teamId: string, id: string): Promise<RunWithAuthor | null> {
  return oneWithAuthor(withAuthor(m).where('r.id = :id AND r.team_id = :teamId', { id, teamId }));
}

export function findRunById(m: EntityManager, id: string): Promise<RunWithAuthor | null> {
  return oneWithAuthor(withAuthor(m).where('r.id = :id', { id }));
}

/** The requested compressed arrays of a run, or null when the run is not in the team. */
export async function loadRunArrays<K extends RunArrayColumn>(
  m: EntityManager,
  teamId: string | null,
  id: string,
  columns: K[],
): Promise<Pick<RunRow, K> | null> {
  const query = m.createQueryBuilder(RunEntity, 'r').select(columns.map((c) => `r.${c}`)).where('r.id = :id', { id });
  if (teamId) query.andWhere('r.team_id = :teamId', { teamId });
  return (await query.getOne()) as Pick<RunRow, K> | null;
}

const sortColumns: Record<ListRunsQuery['sort'], string> = {
  createdAt: 'r.created_at',
  N: 'COALESCE(r.n, r.requested_n)',
  S: 'r.entropy_s',
  status: 'r.status',
};

export async function listRunsOfTeam(m: EntityManager, teamId: string, q: ListRunsQuery): Promise<{ rows: RunWithAuthor[]; total: number }> {
  const query = withAuthor(m).where('r.team_id = :teamId', { teamId });
  if (q.status) query.andWhere('r.status = :status', { status: q.status });
  if (q.regionKind) query.andWhere('r.region_kind = :regionKind', { regionKind: q.regionKind });
  if (q.authorId) query.andWhere('r.author_id = :authorId', { authorId: q.authorId });
  if (q.search) {
    const pattern = `%${q.search.replace(/[\\%_]/g, (c) => `\\${c}`)}%`;
    query.andWhere(`(r.title ILIKE :pattern OR r.id::text ILIKE :pattern OR u.name ILIKE :pattern OR r.truncation_text ILIKE :pattern)`, { pattern });
  }
  const total = await query.clone().getCount();
  const direction = q.order === 'asc' ? 'ASC' : 'DESC';
  query
    .orderBy(sortColumns[q.sort], direction, 'NULLS LAST')
    .addOrderBy('r.created_at', 'DESC')
    .addOrderBy('r.id', 'ASC')
    .offset((q.page - 1) * q.pageSize)
    .limit(q.pageSize);
  const { entities, raw } = await query.getRawAndEntities();
  const names = new Map((raw as { r_id: string; author_name: string }[]).map((r) => [r.r_id, r.author_name]));
  return { rows: entities.map((row) => ({ ...row, authorName: names.get(row.id) ?? '' })), total };
}

/** queued → cancelled in one statement, so it cannot cross the worker's claim; false if not queued. */
export async function cancelQueuedRun(m: EntityManager, teamId: string, id: string): Promise<boolean> {
  return changedRows(
    m,
    `UPDATE runs SET status = 'cancelled', finished_at = now() WHERE id = $1 AND team_id = $2 AND status = 'queued'`,
    [id, teamId],
  );
}

export async function requestCancelOfRunningRun(m: EntityManager, teamId: string, id: string): Promise<boolean> {
  return changedRows(m, `UPDATE runs SET cancel_requested = true WHERE id = $1 AND team_id = $2 AND status = 'running'`, [id, teamId]);
}

export async function deleteRun(m: EntityManager, teamId: string, id: string): Promise<boolean> {
  return changedRows(m, `DELETE FROM runs WHERE id = $1 AND team_id = $2`, [id, teamId]);
}

/** Marks a run failed when nothing will ever run it (e.g. the queue refused the job). */
export async function failRun(m: EntityManager, id: string, message: string): Promise<void> {
  await m.query(
    `UPDATE runs SET status = 'failed', error = $2, finished_at = now() WHERE id = $1 AND status IN ('queued', 'running')`,
    [id, message],
  );
}

// ---- worker side ----

/** Runs still queued or running that were created more than `olderThanMs` ago (for the sweep of lost jobs). */
export async function findUnfinishedRunIds(m: EntityManager, olderThanMs: number): Promise<string[]> {
  const rows: { id: string }[] = await m.query(
    `SELECT id FROM runs WHERE status IN ('queued', 'running') AND created_at < now() - ($1 || ' milliseconds')::interval`,
    [String(olderThanMs)],
  );
  return rows.map((r) => r.id);
}

/**
 * Takes a run for computation: queued (or running again after a worker crash, when BullMQ hands a
 * stalled job out a second time) and not asked to stop. Returns the row with its stored points.
 */
export async function claimRun(m: EntityManager, id: string): Promise<RunRow | null> {
  const claimed = await changedRows(
    m,
    `UPDATE runs SET status = 'running', started_at = COALESCE(started_at, now()), stage = 'sprinkle', percent = 0
      WHERE id = $1 AND status IN ('queued', 'running') AND NOT cancel_requested`,
    [id],
  );
  if (!claimed) return null;
  return m.findOneBy(RunEntity, { id });
}

/** The run's state as the worker sees it while computing: gone, asked to stop, or carry on. */
export async function runControlState(m: EntityManager, id: string): Promise<'deleted' | 'cancel' | 'continue'> {
  const rows: { cancel_requested: boolean; status: RunStatus }[] = await m.query(
    `SELECT cancel_requested, status FROM runs WHERE id = $1`,
    [id],
  );
  if (rows.length === 0) return 'deleted';
  return rows[0]!.cancel_requested || rows[0]!.status === 'cancelled' ? 'cancel' : 'continue';
}

export async function updateRunProgress(m: EntityManager, id: string, stage: VacuumStage, percent: number): Promise<void> {
  await m.query(`UPDATE runs SET stage = $2, percent = $3 WHERE id = $1 AND status = 'running'`, [id, stage, percent]);
}

export interface RunOutcome {
  n: number;
  engineVersion: string;
  backend: string;
  entropyS: number | null;
  summary: RunSummaryRecord;
  points: Buffer;
  eigenvalues: Buffer;
  generalizedEigenvalues: Buffer | null;
  subregionElements: Buffer | null;
}

/**
 * Stores a result in one statement (all or nothing): only while the run is still running and nobody
 * asked to stop it. False when the run was cancelled or deleted meanwhile.
 */
export async function completeRun(m: EntityManager, id: string, outcome: RunOutcome): Promise<boolean> {
  return changedRows(
    m,
    `UPDATE runs SET status = 'done', stage = NULL, percent = 100, finished_at = now(), error = NULL,
            n = $2, engine_version = $3, backend = $4, entropy_s = $5, summary = $6,
            points = $7, eigenvalues = $8, generalized_eigenvalues = $9, subregion_elements = $10
      WHERE id = $1 AND status = 'running' AND NOT cancel_requested`,
    [
      id, outcome.n, outcome.engineVersion, outcome.backend, outcome.entropyS, JSON.stringify(outcome.summary),
      outcome.points, outcome.eigenvalues, outcome.generalizedEigenvalues, outcome.subregionElements,
    ],
  );
}

export async function markRunCancelled(m: EntityManager, id: string): Promise<void> {
  await m.query(
    `UPDATE runs SET status = 'cancelled', finished_at = COALESCE(finished_at, now()) WHERE id = $1 AND status IN ('queued', 'running')`,
    [id],
  );
}

/** running → failed with the message; false if the run is no longer running (deleted, cancelled). */
export async function markRunFailed(m: EntityManager, id: string, message: string, backend: string | null, engineVersion: string): Promise<boolean> {
  return changedRows(
    m,
    `UPDATE runs SET status = 'failed', error = $2, finished_at = now(), backend = COALESCE($3, backend), engine_version = $4
      WHERE id = $1 AND status = 'running'`,
    [id, message, backend, engineVersion],
  );
}
