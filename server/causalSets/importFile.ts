import type { CausalSetMetadata } from '@shared/causalSets';
import type { CausalSetRow } from '../db/causal-set-entities';
import { compressBytes, encodeFloat64, encodeRelation } from '../db/codecs';
import { manifoldLikeness } from '../engine/manifoldLikeness';
import type { BitRelation } from '../engine/order';
import { orderSummary } from '../engine/orderAlgorithms';
import { makeRegion } from '../engine/regions';
import { runInThread } from '../threads/engineThread';
import {
  CausalSetFileError,
  coordinatesOrder,
  parseCoordinatesCsv,
  parseRelationList,
  type SizeLimit,
} from './parse';

/** What an uploaded file becomes in its row, besides names, owner and checksum. */
export type ImportedValues = Pick<CausalSetRow, 'kind' | 'dimension' | 'n' | 'region' | 'density' | 'volume' | 'stats' | 'elements' | 'original'>;

/**
 * Parses and summarises an uploaded file completely (a CausalSetFileError names rows and columns of
 * what is wrong) and packs what the row stores: the elements and the original file, gzipped.
 */
export function importValues(metadata: CausalSetMetadata, bytes: Uint8Array, limit: SizeLimit): ImportedValues {
  const original = compressBytes(bytes);
  if (metadata.kind === 'coordinates') {
    const parsed = parseCoordinatesCsv(bytes, { region: metadata.region, dimension: metadata.dimension, limit });
    const volume = metadata.region ? makeRegion(metadata.region).volume : null;
    return {
      kind: 'coordinates',
      dimension: parsed.dimension,
      n: parsed.n,
      region: metadata.region ?? null,
      density: metadata.density ?? (volume ? parsed.n / volume : null),
      volume,
      stats: coordinatesStats(parsed.points, parsed.dimension, metadata.region),
      elements: encodeFloat64(parsed.points),
      original,
    };
  }
  const parsed = parseRelationList(bytes, { count: metadata.count!, limit });
  return {
    kind: 'relations',
    dimension: metadata.dimension!,
    n: parsed.n,
    region: null,
    density: metadata.density ?? null,
    volume: null,
    stats: { ...orderSummary(parsed.causal), manifold: manifoldLikeness({ kind: 'relation', causal: parsed.causal }) },
    elements: encodeRelation(parsed.causal),
    original,
  };
}

/**
 * The order statistics of imported coordinates with the manifold-likeness report: 2D points without a
 * periodic x by the light-cone route, anything else from the relation already built for the summary.
 */
function coordinatesStats(points: Float64Array, dimension: 2 | 4, region: CausalSetMetadata['region']): ImportedValues['stats'] {
  const causal: BitRelation = coordinatesOrder(points, dimension, region);
  const periodX = region ? makeRegion(region).periodX : undefined;
  const manifold =
    dimension === 2 && periodX === undefined ? manifoldLikeness({ kind: 'points', points, dimension }) : manifoldLikeness({ kind: 'relation', causal });
  return { ...orderSummary(causal), manifold };
}

/** Files from this size on are parsed in a worker_thread: below it the thread's start-up costs more. */
export const THREADED_IMPORT_FROM_BYTES = 1 << 20;

/** What the thread body posts back: the values, or the file error's parts to rebuild it here. */
export type ImportThreadOutcome =
  | { ok: true; values: ImportedValues }
  | { ok: false; code: CausalSetFileError['code']; problems: CausalSetFileError['problems']; more: number };

const importThreadBody = new URL('./importThread.worker.ts', import.meta.url).href;

const asBuffer = (bytes: Uint8Array) => Buffer.from(bytes.buffer, bytes.byteOffset, bytes.byteLength);

/**
 * `importValues` off the event loop for large files: parsing, the order summary and gzip of a
 * 20 MB relation list take about a second, during which the API would answer nobody. The same
 * errors come back: a CausalSetFileError with its problems, anything else as an Error.
 */
export async function importValuesOffThread(
  metadata: CausalSetMetadata,
  bytes: Uint8Array,
  limit: SizeLimit,
  options: { threadFromBytes?: number } = {},
): Promise<ImportedValues> {
  if (bytes.byteLength < (options.threadFromBytes ?? THREADED_IMPORT_FROM_BYTES)) return importValues(metadata, bytes, limit);
  const outcome = await runInThread<ImportThreadOutcome>(importThreadBody, { metadata, bytes, limit });
  if (!outcome.ok) throw new CausalSetFileError(outcome.code, outcome.problems, outcome.more);
  // structured cloning hands Buffers back as plain Uint8Arrays; the bytea columns take Buffers
  return { ...outcome.values, elements: asBuffer(outcome.values.elements), original: asBuffer(outcome.values.original) };
}
