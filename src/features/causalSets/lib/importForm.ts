import { causalSetMetadataSchema, type CausalSetKind, type CausalSetMetadata } from '@shared/causalSets';
import { defaultRegionKind, regionDescriptors, regionFieldKeys, regionFromFieldText, type RegionFieldValues } from '@shared/regions';
import { recordedRegion, smallestCentredDiamond } from '@shared/regionProposal';
import type { RegionSpec } from '@shared/vacuum';
import { parseNumber, validate, type FieldErrors } from '../../../lib/forms';

/** The import form as typed: every number is text until submitted. */
export interface ImportFormValues extends RegionFieldValues {
  name: string;
  kind: CausalSetKind;
  /** coordinates: how the spacetime volume per element is known */
  scale: 'region' | 'density';
  density: string;
  /** relations only */
  count: string;
  dimension: '2' | '4';
}

export function defaultImportForm(): ImportFormValues {
  return {
    name: '',
    kind: 'coordinates',
    scale: 'region',
    regionKind: defaultRegionKind,
    // the file's own region: only the proper time of the default diamond is proposed
    ...(Object.fromEntries(regionFieldKeys.map((key) => [key, ''])) as Pick<ImportFormValues, (typeof regionFieldKeys)[number]>),
    properTime: '2',
    density: '',
    count: '',
    dimension: '2',
  };
}

/** Field name of the form for a schema path ("region.properTime" → "properTime"). */
export function importFieldFor(path: string): string {
  if (path.startsWith('region.')) return path.slice('region.'.length);
  return path;
}

/** The metadata to send, checked with the same schema as the server, or messages per form field. */
export function metadataFromForm(v: ImportFormValues): { ok: true; metadata: CausalSetMetadata } | { ok: false; errors: FieldErrors } {
  const candidate: Record<string, unknown> = { name: v.name, kind: v.kind };
  if (v.kind === 'coordinates') {
    if (v.scale === 'region') candidate.region = regionFromFieldText(v);
    else candidate.density = parseNumber(v.density);
  } else {
    candidate.count = parseNumber(v.count);
    candidate.dimension = Number(v.dimension);
    const density = parseNumber(v.density);
    if (density !== undefined) candidate.density = density;
  }
  const result = validate(causalSetMetadataSchema, candidate);
  if (result.ok) return { ok: true, metadata: result.data };
  const errors: FieldErrors = {};
  for (const [path, message] of Object.entries(result.errors)) {
    const field = importFieldFor(path);
    if (!(field in errors)) errors[field] = message;
  }
  // a refinement over several fields (a slab's max > min) is shown beside them, not only at the kind
  const at = regionDescriptors[v.regionKind].refinementField;
  if (errors.region && v.scale === 'region' && at && !errors[at]) errors[at] = errors.region;
  return { ok: false, errors };
}

/** A name for the set from its file name: no folder, no extension. */
export function nameFromFileName(fileName: string): string {
  const base = fileName.split(/[\\/]/).pop() ?? fileName;
  return base.replace(/\.(csv|txt|dat)$/i, '').trim();
}

export function formatBytes(bytes: number): string {
  if (bytes < 1024) return `${bytes} B`;
  if (bytes < 1024 * 1024) return `${(bytes / 1024).toFixed(1)} KiB`;
  return `${(bytes / (1024 * 1024)).toFixed(1)} MiB`;
}

/** What the first rows of a file suggest, so the form can preset the kind and dimension. */
export interface FileSniff {
  kind: CausalSetKind | null;
  dimension: 2 | 4 | null;
  /** relations: the largest label seen plus one, a guess for the element count */
  countGuess: number | null;
  /** the first lines, for showing beside the form */
  head: string[];
  rows: number;
  /** coordinates: the region the form proposes for the file, null when it cannot tell */
  proposal: RegionProposal | null;
}

/** The region proposed for a file: the one `tacet sprinkle` recorded in it, else the smallest centred diamond holding its points. */
export interface RegionProposal {
  region: RegionSpec;
  from: 'recorded' | 'points';
}

/** The recorded region wins; else every readable row's point goes into the smallest centred diamond (a row that is no point is left to the server's check). */
export function proposeRegion(text: string, dimension: 2 | 4, dataLines: string[]): RegionProposal | null {
  const recorded = recordedRegion(text);
  if (recorded) return { region: recorded, from: 'recorded' };
  const points: number[] = [];
  for (const line of dataLines) {
    const values = line.split(',').map((cell) => Number(cell.replace(/"/g, '').trim()));
    if (values.length === dimension && values.every(Number.isFinite)) points.push(...values);
  }
  return points.length ? { region: smallestCentredDiamond(points, dimension), from: 'points' } : null;
}

/** The form with a region's kind and fields filled in (the proposal accepted). */
export function formWithRegion(v: ImportFormValues, region: RegionSpec): ImportFormValues {
  const fields = Object.fromEntries(regionFieldKeys.map((key) => [key, key in region ? String((region as Record<string, unknown>)[key]) : '']));
  return { ...v, ...fields, regionKind: region.kind, scale: 'region' };
}

export function sniffFile(text: string): FileSniff {
  const lines = text.replace(/^\ufeff/, '').split(/\r\n|\n|\r/);
  const content = lines.map((l) => l.trim()).filter((l) => l !== '' && !l.startsWith('#'));
  const first = (content[0] ?? '').toLowerCase().replace(/\s|"/g, '');
  let kind: CausalSetKind | null = null;
  let dimension: 2 | 4 | null = null;
  if (first === 't,x') [kind, dimension] = ['coordinates', 2];
  else if (first === 't,x,y,z') [kind, dimension] = ['coordinates', 4];
  else if (first === 'i,j' || /^\d+,\d+$/.test(first)) kind = 'relations';
  let countGuess: number | null = null;
  if (kind === 'relations') {
    let max = -1;
    for (const line of content) {
      const match = /^\s*"?(\d+)"?\s*,\s*"?(\d+)"?\s*$/.exec(line);
      if (match) max = Math.max(max, Number(match[1]), Number(match[2]));
    }
    countGuess = max >= 0 ? max + 1 : null;
  }
  const proposal = kind === 'coordinates' && dimension !== null ? proposeRegion(text, dimension, content.slice(1)) : null;
  return { kind, dimension, countGuess, head: lines.slice(0, 6), rows: Math.max(0, content.length - (kind === 'coordinates' || first === 'i,j' ? 1 : 0)), proposal };
}
