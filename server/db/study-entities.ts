import { EntitySchema } from 'typeorm';
import type { CellStatus, ResolvedSubregion, StudyCausalSet, StudyStatus } from '@shared/studies';

/**
 * Scaling studies (issue 5). Like ./entities.ts: EntitySchemas only, the tables are made by the
 * hand-written migration 1764892800000-studies.ts.
 */

export interface StudyRow {
  id: string;
  teamId: string;
  authorId: string;
  title: string | null;
  status: StudyStatus;
  cancelRequested: boolean;
  /** the validated CreateStudyRequest */
  request: Record<string, unknown>;
  subregions: ResolvedSubregion[];
  /** the imported causal sets of a study over them (cell seeds are their ids); null for sprinklings */
  causalSets: StudyCausalSet[] | null;
  regionKind: string;
  cellsTotal: number;
  error: string | null;
  createdAt: Date;
  startedAt: Date | null;
  finishedAt: Date | null;
}

/** What a finished cell keeps beside its spectrum. */
export interface StudyCellRecord {
  density: number | null;
  entropies: { subregion: string; rule: string; n: number; S: number; modesKept: number; cutoff: number }[];
  states: { rule: string; cutoff: number; modesKept: number }[];
  sprinkling: { seed: string; prng: string; process: string } | null;
  timings: Record<string, number>;
}

export interface StudyCellRow {
  id: string;
  studyId: string;
  position: number;
  requestedN: number;
  seed: string;
  status: CellStatus;
  percent: number;
  n: number | null;
  result: StudyCellRecord | null;
  eigenvalues: Buffer | null;
  /** the cell's copy of its imported causal set's stored elements; not selected unless asked for */
  elements?: Buffer | null;
  error: string | null;
  engineVersion: string | null;
  backend: string | null;
  startedAt: Date | null;
  finishedAt: Date | null;
  /** when the cell was last queued (planned, added by an extension, or retried) */
  queuedAt?: Date;
}

const id = { type: 'uuid', primary: true, generated: 'uuid' } as const;

export const StudyEntity = new EntitySchema<StudyRow>({
  name: 'Study',
  tableName: 'studies',
  columns: {
    id,
    teamId: { type: 'uuid', name: 'team_id' },
    authorId: { type: 'uuid', name: 'author_id' },
    title: { type: 'text', nullable: true },
    status: { type: 'text', default: 'queued' },
    cancelRequested: { type: 'boolean', name: 'cancel_requested', default: false },
    request: { type: 'jsonb' },
    subregions: { type: 'jsonb' },
    causalSets: { type: 'jsonb', name: 'causal_sets', nullable: true },
    regionKind: { type: 'text', name: 'region_kind' },
    cellsTotal: { type: 'integer', name: 'cells_total' },
    error: { type: 'text', nullable: true },
    createdAt: { type: 'timestamptz', name: 'created_at', createDate: true },
    startedAt: { type: 'timestamptz', name: 'started_at', nullable: true },
    finishedAt: { type: 'timestamptz', name: 'finished_at', nullable: true },
  },
});

export const StudyCellEntity = new EntitySchema<StudyCellRow>({
  name: 'StudyCell',
  tableName: 'study_cells',
  columns: {
    id,
    studyId: { type: 'uuid', name: 'study_id' },
    position: { type: 'integer' },
    requestedN: { type: 'integer', name: 'requested_n' },
    seed: { type: 'text' },
    status: { type: 'text', default: 'queued' },
    percent: { type: 'real', default: 0 },
    n: { type: 'integer', nullable: true },
    result: { type: 'jsonb', nullable: true },
    eigenvalues: { type: 'bytea', nullable: true },
    elements: { type: 'bytea', nullable: true, select: false },
    error: { type: 'text', nullable: true },
    engineVersion: { type: 'text', name: 'engine_version', nullable: true },
    backend: { type: 'text', nullable: true },
    startedAt: { type: 'timestamptz', name: 'started_at', nullable: true },
    finishedAt: { type: 'timestamptz', name: 'finished_at', nullable: true },
    queuedAt: { type: 'timestamptz', name: 'queued_at', default: () => 'now()' },
  },
});

export const studyEntities = [StudyEntity, StudyCellEntity];
