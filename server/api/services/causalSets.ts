import { createHash } from 'node:crypto';
import type { DataSource, EntityManager } from 'typeorm';
import {
  CAUSAL_SET_FILE_LIMIT_BYTES,
  causalSetMetadataSchema,
  metadataFromFormFields,
  type CausalSetDetail,
  type CausalSetLimits,
  type CausalSetSummary,
} from '@shared/causalSets';
import { importValuesOffThread } from '../../causalSets/importFile';
import { decodeFloat64, decodeRelationWords, decompressBytes, encodeFloat64 } from '../../db/codecs';
import * as causalSets from '../../db/repositories/causalSets';
import type { UserRow } from '../../db/entities';
import { DENSE_SIZE_LIMIT } from '../../engine/index';
import type { CausalSetReference } from '../../runs/request';
import type { TeamContext } from '../context';
import { badRequest, notFound } from '../errors';
import { dimensionWarning } from '@shared/manifoldLikeness';

const uuidPattern = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

export interface UploadedFile {
  originalName: string;
  bytes: Buffer;
}

/** An imported causal set as a run takes it: its reference and its elements, in the run's storage form. */
export interface CausalSetRunInput {
  reference: CausalSetReference;
  dimension: 2 | 4;
  n: number;
  /** coordinates, flat; null for a relation list */
  points: Float64Array | null;
  /** the closed relation's bit-packed words; null for coordinates */
  relationWords: Uint32Array | null;
  /** what the run row keeps so it never depends on the causal set again */
  stored: { points: Buffer | null; relation: Buffer | null };
}

/** The copy a run makes of a causal set of the team; null when the team has no such set. */
export async function loadCausalSetRunInput(m: EntityManager, teamId: string, id: string): Promise<CausalSetRunInput | null> {
  const row = uuidPattern.test(id) ? await causalSets.findCausalSetElements(m, teamId, id.toLowerCase()) : null;
  if (!row) return null;
  const reference: CausalSetReference = {
    id: row.id,
    name: row.name,
    kind: row.kind,
    checksum: row.checksum,
    N: row.n,
    density: row.density,
    region: row.region,
  };
  if (row.kind === 'coordinates') {
    const points = decodeFloat64(row.elements);
    return { reference, dimension: row.dimension, n: row.n, points, relationWords: null, stored: { points: encodeFloat64(points), relation: null } };
  }
  return {
    reference,
    dimension: row.dimension,
    n: row.n,
    points: null,
    relationWords: decodeRelationWords(row.elements, row.n),
    stored: { points: null, relation: row.elements },
  };
}

export type CausalSetService = ReturnType<typeof createCausalSetService>;

/** Keeps the last path segment of a client-sent name and anything printable; never empty. */
function cleanFileName(name: string): string {
  const base = name.split(/[\\/]/).pop() ?? '';
  // eslint-disable-next-line no-control-regex
  const printable = base.replace(/[\u0000-\u001f\u007f]/g, '').trim().slice(0, 255);
  return printable || 'causal-set.csv';
}

function toSummary(row: causalSets.CausalSetListing): CausalSetSummary {
  const { layerSizes: _layers, ...stats } = row.stats;
  return {
    id: row.id,
    name: row.name,
    kind: row.kind,
    dimension: row.dimension,
    N: row.n,
    region: row.region,
    density: row.density,
    volume: row.volume,
    fileName: row.fileName,
    fileBytes: row.fileBytes,
    checksum: row.checksum,
    stats,
    warnings: stats.manifold ? [dimensionWarning(row.dimension, stats.manifold)].filter((w): w is string => w !== null) : [],
    createdBy: { id: row.createdBy, name: row.createdByName },
    createdAt: row.createdAt.toISOString(),
  };
}

export function createCausalSetService(deps: { dataSource: DataSource; maxElements?: number; maxFileBytes?: number }) {
  const { dataSource } = deps;
  const m = dataSource.manager;
  const limits: CausalSetLimits = {
    maxElements: deps.maxElements ?? DENSE_SIZE_LIMIT.maxN,
    maxFileBytes: deps.maxFileBytes ?? CAUSAL_SET_FILE_LIMIT_BYTES,
  };
  const sizeLimit = { maxElements: limits.maxElements, reason: DENSE_SIZE_LIMIT.reason };

  const validId = (id: string) => (uuidPattern.test(id) ? id.toLowerCase() : null);

  async function listingOrThrow(teamId: string, id: string): Promise<causalSets.CausalSetListing> {
    const key = validId(id);
    const row = key ? await causalSets.findCausalSetListing(m, teamId, key) : null;
    if (!row) throw notFound('Causal set not found.');
    return row;
  }

  return {
    limits: () => limits,

    /**
     * Validates the metadata and the file completely before anything is written: a CausalSetFileError
     * (row/column messages) or a ZodError leaves the database untouched. Files of 1 MB and more are
     * parsed in a worker_thread, so the API keeps answering meanwhile.
     */
    async importFile(team: TeamContext, uploader: UserRow, fields: Record<string, unknown>, file: UploadedFile | undefined): Promise<{ id: string }> {
      const metadata = causalSetMetadataSchema.parse(metadataFromFormFields(fields));
      if (!file) throw badRequest('file_missing', 'Attach the file as the multipart field "file".');
      const values = await importValuesOffThread(metadata, file.bytes, sizeLimit);
      const row = await causalSets.insertCausalSet(m, {
        ...values,
        teamId: team.id,
        createdBy: uploader.id,
        name: metadata.name,
        fileName: cleanFileName(file.originalName),
        fileBytes: file.bytes.length,
        checksum: createHash('sha256').update(file.bytes).digest('hex'),
      });
      return { id: row.id };
    },

    async list(teamId: string): Promise<CausalSetSummary[]> {
      return (await causalSets.listCausalSets(m, teamId)).map(toSummary);
    },

    async detail(teamId: string, id: string): Promise<CausalSetDetail> {
      const listing = await listingOrThrow(teamId, id);
      const summary = toSummary(listing);
      if (listing.kind === 'relations') {
        return { ...summary, preview: { kind: 'relations', layerSizes: listing.stats.layerSizes } };
      }
      const stored = await causalSets.findCausalSetElements(m, teamId, listing.id);
      const flat = decodeFloat64(stored!.elements);
      const d = listing.dimension;
      const points: number[][] = [];
      for (let i = 0; i < listing.n; i++) points.push(Array.from(flat.subarray(i * d, (i + 1) * d)));
      return {
        ...summary,
        preview: { kind: 'coordinates', columns: d === 2 ? ['t', 'x'] : ['t', 'x', 'y', 'z'], points },
      };
    },

    /** The uploaded bytes, exactly as they came. */
    async originalFile(teamId: string, id: string): Promise<{ fileName: string; bytes: Buffer }> {
      const key = validId(id);
      const row = key ? await causalSets.findCausalSetOriginal(m, teamId, key) : null;
      if (!row) throw notFound('Causal set not found.');
      return { fileName: row.fileName, bytes: decompressBytes(row.original) };
    },

    async remove(teamId: string, id: string): Promise<void> {
      const key = validId(id);
      if (!key || !(await causalSets.deleteCausalSet(m, teamId, key))) throw notFound('Causal set not found.');
    },
  };
}
