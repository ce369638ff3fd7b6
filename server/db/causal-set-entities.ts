import { EntitySchema } from 'typeorm';
import type { CausalSetKind, CausalSetStats } from '@shared/causalSets';
import type { RegionSpec } from '@shared/vacuum';

/**
 * Imported causal sets (issue 6). Like ./entities.ts: an EntitySchema only, the table is made by the
 * hand-written migration 1764806400000-causal-sets.ts. `elements` holds, gzip-compressed, either the
 * coordinates (float64 little-endian, element after element) or the transitively closed relation
 * (bit-packed rows of ⌈N/32⌉ uint32 little-endian words, bit j of row i set iff i ≺ j); `original`
 * the uploaded bytes, gzip-compressed, so the file can be downloaded exactly as it came.
 */
export interface CausalSetRow {
  id: string;
  teamId: string;
  createdBy: string;
  name: string;
  kind: CausalSetKind;
  dimension: 2 | 4;
  n: number;
  region: RegionSpec | null;
  density: number | null;
  volume: number | null;
  fileName: string;
  fileBytes: number;
  /** SHA-256 of the uploaded bytes, lower-case hex */
  checksum: string;
  stats: CausalSetStats & { layerSizes: number[] };
  elements: Buffer;
  original: Buffer;
  createdAt: Date;
}

export const CausalSetEntity = new EntitySchema<CausalSetRow>({
  name: 'CausalSet',
  tableName: 'causal_sets',
  columns: {
    id: { type: 'uuid', primary: true, generated: 'uuid' },
    teamId: { type: 'uuid', name: 'team_id' },
    createdBy: { type: 'uuid', name: 'created_by' },
    name: { type: 'text' },
    kind: { type: 'text' },
    dimension: { type: 'smallint' },
    n: { type: 'integer' },
    region: { type: 'jsonb', nullable: true },
    density: { type: 'double precision', nullable: true },
    volume: { type: 'double precision', nullable: true },
    fileName: { type: 'text', name: 'file_name' },
    fileBytes: { type: 'integer', name: 'file_bytes' },
    checksum: { type: 'text' },
    stats: { type: 'jsonb' },
    elements: { type: 'bytea' },
    original: { type: 'bytea' },
    createdAt: { type: 'timestamptz', name: 'created_at', createDate: true },
  },
});

export const causalSetEntities = [CausalSetEntity];
