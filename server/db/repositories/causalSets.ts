import type { EntityManager } from 'typeorm';
import { CausalSetEntity, type CausalSetRow } from '../causal-set-entities';

/** A causal set without its two large columns, with the uploader's name: what tables and summaries need. */
export type CausalSetListing = Omit<CausalSetRow, 'elements' | 'original'> & { createdByName: string };

const listingColumns = `cs.id, cs.team_id, cs.created_by, u.name AS created_by_name, cs.name, cs.kind, cs.dimension, cs.n,
  cs.region, cs.density, cs.volume, cs.file_name, cs.file_bytes, cs.checksum, cs.stats, cs.created_at`;

interface ListingRecord {
  id: string;
  team_id: string;
  created_by: string;
  created_by_name: string;
  name: string;
  kind: CausalSetRow['kind'];
  dimension: number;
  n: number;
  region: CausalSetRow['region'];
  density: number | null;
  volume: number | null;
  file_name: string;
  file_bytes: number;
  checksum: string;
  stats: CausalSetRow['stats'];
  created_at: Date;
}

function toListing(r: ListingRecord): CausalSetListing {
  return {
    id: r.id,
    teamId: r.team_id,
    createdBy: r.created_by,
    createdByName: r.created_by_name,
    name: r.name,
    kind: r.kind,
    dimension: r.dimension as 2 | 4,
    n: r.n,
    region: r.region,
    density: r.density,
    volume: r.volume,
    fileName: r.file_name,
    fileBytes: r.file_bytes,
    checksum: r.checksum,
    stats: r.stats,
    createdAt: r.created_at,
  };
}

export function insertCausalSet(m: EntityManager, values: Omit<CausalSetRow, 'id' | 'createdAt'>): Promise<CausalSetRow> {
  return m.save(CausalSetEntity, m.create(CausalSetEntity, values));
}

/** The team's causal sets, newest first. */
export async function listCausalSets(m: EntityManager, teamId: string): Promise<CausalSetListing[]> {
  const rows: ListingRecord[] = await m.query(
    `SELECT ${listingColumns} FROM causal_sets cs JOIN users u ON u.id = cs.created_by
      WHERE cs.team_id = $1 ORDER BY cs.created_at DESC, cs.id`,
    [teamId],
  );
  return rows.map(toListing);
}

export async function findCausalSetListing(m: EntityManager, teamId: string, id: string): Promise<CausalSetListing | null> {
  const rows: ListingRecord[] = await m.query(
    `SELECT ${listingColumns} FROM causal_sets cs JOIN users u ON u.id = cs.created_by
      WHERE cs.team_id = $1 AND cs.id = $2`,
    [teamId, id],
  );
  return rows[0] ? toListing(rows[0]) : null;
}

/** The stored elements (still compressed) with what is needed to read them. */
export function findCausalSetElements(
  m: EntityManager,
  teamId: string,
  id: string,
): Promise<Pick<CausalSetRow, 'id' | 'kind' | 'dimension' | 'n' | 'region' | 'density' | 'volume' | 'elements' | 'checksum' | 'name'> | null> {
  return m.findOne(CausalSetEntity, {
    where: { teamId, id },
    select: { id: true, kind: true, dimension: true, n: true, region: true, density: true, volume: true, elements: true, checksum: true, name: true },
  });
}

export function findCausalSetOriginal(m: EntityManager, teamId: string, id: string): Promise<Pick<CausalSetRow, 'fileName' | 'original'> | null> {
  return m.findOne(CausalSetEntity, { where: { teamId, id }, select: { id: true, fileName: true, original: true } });
}

/** True when a row was deleted. */
export async function deleteCausalSet(m: EntityManager, teamId: string, id: string): Promise<boolean> {
  const result = await m.delete(CausalSetEntity, { teamId, id });
  return (result.affected ?? 0) > 0;
}
