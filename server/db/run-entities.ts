import type { ManifoldLikenessReport } from '@shared/manifoldLikeness';
import { EntitySchema } from 'typeorm';
import type { RunStatus } from '@shared/runs';
import type { RestrictedCut, TruncationRule, VacuumStage } from '@shared/vacuum';

/**
 * Runs and cut rules (issue 4). Like ./entities.ts: EntitySchemas only, tables made by the
 * hand-written migration 1764720000000-runs.ts. Long arrays are gzip-compressed little-endian bytes
 * (./codecs.ts); the scalar results live in `summary`.
 */

/** One entropy beside the subregion's (A, B, A∪B of a pair; the causal complement), as `summary` keeps it. */
export interface EntropyPartRecord {
  S: number;
  n: number;
  modesKept: number;
  cutoff: number;
  restrictedCut: RestrictedCut | null;
}

/** Result numbers kept as JSON beside the compressed arrays. */
export interface RunSummaryRecord {
  density: number | null;
  volume: number | null;
  relations: number;
  links: number | null;
  cutoff: number;
  modesKept: number;
  knee: unknown;
  diagnostics: Record<string, unknown>;
  timings: Record<string, number>;
  /** restrictedCut: the second cut applied (null without double truncation; absent in runs stored before it was a setting, which used √n/(4π)) */
  /** renyi: S_α by renyiKey when orders were asked (absent in runs stored before them) */
  entropy: { S: number; n: number; modesKept: number; cutoff: number; doubleTruncation: boolean; restrictedCut?: RestrictedCut | null; renyi?: Record<string, number> | null } | null;
  /** I(A:B) and the entropies of A, B and A∪B, when a pair was asked (absent in runs stored before pairs) */
  mutualInformation?: { I: number; a: EntropyPartRecord; b: EntropyPartRecord; union: EntropyPartRecord } | null;
  /** the causal complement's entropy and S_O′ − S_O, when asked (absent in runs stored before it) */
  complement?: (EntropyPartRecord & { difference: number }) | null;
  /** cautions for the rule on this dimension (absent in runs stored before them) */
  cautions?: string[];
  /** counts and dimension estimators of the run's causal set (absent in runs stored before them) */
  manifold?: ManifoldLikenessReport | null;
  /** which engine ran and why (absent in runs stored before the structured engine) */
  engine?: 'dense' | 'structured';
  engineReason?: string;
}

export interface RunRow {
  id: string;
  teamId: string;
  authorId: string;
  title: string | null;
  status: RunStatus;
  stage: VacuumStage | null;
  percent: number;
  cancelRequested: boolean;
  /** the validated request (see server/runs/request.ts for the re-analysis form) */
  request: Record<string, unknown>;
  dimension: 2 | 4;
  regionKind: string;
  requestedN: number | null;
  n: number | null;
  truncationText: string;
  entropyS: number | null;
  error: string | null;
  engineVersion: string | null;
  backend: string | null;
  createdAt: Date;
  startedAt: Date | null;
  finishedAt: Date | null;
  parentRunId: string | null;
  summary: RunSummaryRecord | null;
  points: Buffer | null;
  eigenvalues: Buffer | null;
  generalizedEigenvalues: Buffer | null;
  subregionElements: Buffer | null;
  /** a run on an imported relation list: its closed relation, gzip of the bit-packed rows */
  relation: Buffer | null;
}

export interface CutRuleRow {
  id: string;
  teamId: string;
  name: string;
  rule: TruncationRule;
  note: string | null;
  createdBy: string;
  createdAt: Date;
}

const id = { type: 'uuid', primary: true, generated: 'uuid' } as const;
const createdAt = { type: 'timestamptz', name: 'created_at', createDate: true } as const;

export const RunEntity = new EntitySchema<RunRow>({
  name: 'Run',
  tableName: 'runs',
  columns: {
    id,
    teamId: { type: 'uuid', name: 'team_id' },
    authorId: { type: 'uuid', name: 'author_id' },
    title: { type: 'text', nullable: true },
    status: { type: 'text', default: 'queued' },
    stage: { type: 'text', nullable: true },
    percent: { type: 'real', default: 0 },
    cancelRequested: { type: 'boolean', name: 'cancel_requested', default: false },
    request: { type: 'jsonb' },
    dimension: { type: 'smallint' },
    regionKind: { type: 'text', name: 'region_kind' },
    requestedN: { type: 'integer', name: 'requested_n', nullable: true },
    n: { type: 'integer', nullable: true },
    truncationText: { type: 'text', name: 'truncation_text' },
    entropyS: { type: 'double precision', name: 'entropy_s', nullable: true },
    error: { type: 'text', nullable: true },
    engineVersion: { type: 'text', name: 'engine_version', nullable: true },
    backend: { type: 'text', nullable: true },
    createdAt,
    startedAt: { type: 'timestamptz', name: 'started_at', nullable: true },
    finishedAt: { type: 'timestamptz', name: 'finished_at', nullable: true },
    parentRunId: { type: 'uuid', name: 'parent_run_id', nullable: true },
    summary: { type: 'jsonb', nullable: true },
    points: { type: 'bytea', nullable: true },
    eigenvalues: { type: 'bytea', nullable: true },
    generalizedEigenvalues: { type: 'bytea', name: 'generalized_eigenvalues', nullable: true },
    subregionElements: { type: 'bytea', name: 'subregion_elements', nullable: true },
    relation: { type: 'bytea', nullable: true },
  },
});

export const CutRuleEntity = new EntitySchema<CutRuleRow>({
  name: 'CutRule',
  tableName: 'cut_rules',
  columns: {
    id,
    teamId: { type: 'uuid', name: 'team_id' },
    name: { type: 'text' },
    rule: { type: 'jsonb' },
    note: { type: 'text', nullable: true },
    createdBy: { type: 'uuid', name: 'created_by' },
    createdAt,
  },
});

export const runEntities = [RunEntity, CutRuleEntity];
