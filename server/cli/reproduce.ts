import { createHash } from 'node:crypto';
import { existsSync } from 'node:fs';
import type { Readable } from 'node:stream';
import yauzl, { type Entry, type ZipFile } from 'yauzl';
import {
  bundleManifestSchema,
  entropiesAgree,
  relativeDifference,
  REPRODUCE_RELATIVE_TOLERANCE,
  type BundleEntropy,
  type BundleManifest,
  type BundleSubregion,
  type ReproduceReport,
} from '@shared/bundles';
import { ENTROPY_FLOOR } from '@shared/precision';
import type { Event } from '@shared/regions';
import { studyRuleKey, type ResolvedSubregion, type StudyRule } from '@shared/studies';
import type { SubregionSpec } from '@shared/vacuum';
import { computeVacuum, type VacuumRequest } from '../engine/index';
import { makeRegion } from '../engine/regions';
import { computeStudyCell, type ImportedCellSource } from '../studies/cell';
import { coordinatesFromCsv, relationWordsFromCsv } from '../exports/bundle/files';

/** A bundle that cannot be trusted or read: named, refused, exit code 1. */
export class BundleRefusedError extends Error {
  override readonly name = 'BundleRefusedError';
}

/** Computed again, the bundle disagrees with its own numbers: the report is printed, exit code 1. */
export class ReproductionMismatchError extends Error {
  override readonly name = 'ReproductionMismatchError';
}

interface ReproduceIo {
  stdout: (text: string) => void;
  stderr: (text: string) => void;
  /** stderr is a terminal: progress rewrites one line */
  progress: boolean;
}

function openZip(path: string): Promise<ZipFile> {
  return new Promise((resolve, reject) =>
    yauzl.open(path, { lazyEntries: true, autoClose: false }, (error, zip) => (error ? reject(new BundleRefusedError(`${path} is not a readable zip: ${error.message}`)) : resolve(zip))),
  );
}

function listEntries(zip: ZipFile): Promise<Entry[]> {
  return new Promise((resolve, reject) => {
    const entries: Entry[] = [];
    zip.on('entry', (entry: Entry) => {
      entries.push(entry);
      zip.readEntry();
    });
    zip.once('end', () => resolve(entries));
    zip.once('error', (error: Error) => reject(new BundleRefusedError(`the zip is damaged: ${error.message}`)));
    zip.readEntry();
  });
}

function readStream(zip: ZipFile, entry: Entry): Promise<Readable> {
  return new Promise((resolve, reject) =>
    zip.openReadStream(entry, (error, stream) => (error ? reject(new BundleRefusedError(`${entry.fileName} cannot be read: ${error.message}`)) : resolve(stream))),
  );
}

/** The SHA-256 of an entry, read as a stream (nothing kept). */
async function hashOf(zip: ZipFile, entry: Entry): Promise<string> {
  const hash = createHash('sha256');
  const stream = await readStream(zip, entry);
  try {
    for await (const chunk of stream) hash.update(chunk as Buffer);
  } catch (error) {
    throw new BundleRefusedError(`${entry.fileName} is damaged in the zip: ${(error as Error).message}`);
  }
  return hash.digest('hex');
}

async function textOf(zip: ZipFile, entry: Entry): Promise<string> {
  const chunks: Buffer[] = [];
  for await (const chunk of await readStream(zip, entry)) chunks.push(chunk as Buffer);
  return Buffer.concat(chunks).toString('utf8');
}

/**
 * Reads manifest.json and checks every other file against its SHA-256 there: a file that differs, one
 * the manifest lists but the zip lacks, and one the zip holds but the manifest does not list are each
 * named and the bundle refused.
 */
async function verifiedManifest(zip: ZipFile, entries: Map<string, Entry>): Promise<BundleManifest> {
  const manifestEntry = entries.get('manifest.json');
  if (!manifestEntry) throw new BundleRefusedError('the bundle has no manifest.json; it was not written by Tacet, or it was cut short');
  let raw: unknown;
  try {
    raw = JSON.parse(await textOf(zip, manifestEntry));
  } catch (error) {
    throw new BundleRefusedError(`manifest.json is not JSON: ${(error as Error).message}`);
  }
  const parsed = bundleManifestSchema.safeParse(raw);
  if (!parsed.success) {
    const issue = parsed.error.issues[0]!;
    throw new BundleRefusedError(`manifest.json is not a Tacet bundle manifest: ${issue.path.join('.') || '(top)'}: ${issue.message}`);
  }
  const manifest = parsed.data;
  for (const path of Object.keys(manifest.files)) {
    if (!entries.has(path)) throw new BundleRefusedError(`${path} is listed in manifest.json but missing from the bundle`);
  }
  for (const [path, entry] of entries) {
    if (path === 'manifest.json' || path.endsWith('/')) continue;
    const expected = manifest.files[path];
    if (!expected) throw new BundleRefusedError(`${path} is in the bundle but not in manifest.json`);
    if ((await hashOf(zip, entry)) !== expected) throw new BundleRefusedError(`${path} does not match its SHA-256 in manifest.json (altered or damaged)`);
  }
  for (const [k, e] of manifest.entropies.entries()) {
    if (!(e.points in manifest.files)) throw new BundleRefusedError(`manifest.json entropy ${k} names ${e.points}, which the bundle does not hold`);
  }
  return manifest;
}

type BundlePart = Extract<BundleSubregion, { elements: number[] }> | Extract<BundleSubregion, { past: unknown }>;
const subregionSpec = (s: BundlePart): SubregionSpec => ('elements' in s ? { kind: 'elements', indices: s.elements } : { kind: 'diamond', past: s.past, future: s.future });

/** The engine request that computes an entry again: its elements, placement, field, rule, subregion and engine. */
export function requestOfEntry(entry: BundleEntropy, elements: Elements): VacuumRequest {
  const source: VacuumRequest['source'] =
    'words' in elements
      ? { kind: 'order', causal: elements.words, count: entry.N, dimension: entry.dimension, ...(entry.density !== null ? { density: entry.density } : {}) }
      : {
          kind: 'points',
          points: elements.points,
          dimension: entry.dimension,
          // the region gives the periodic x of a cylinder and the membership check; the density is the one the computation used
          ...(entry.region ? { region: entry.region } : {}),
          ...(entry.density !== null ? { density: entry.density } : {}),
        };
  const subregion = entry.subregion;
  return {
    source,
    mass: entry.mass,
    truncation: entry.rule.truncation,
    doubleTruncation: entry.rule.doubleTruncation,
    ...(entry.rule.restrictedCut ? { restrictedCut: entry.rule.restrictedCut } : {}),
    engine: entry.engine,
    ...('pair' in subregion ? { mutualInformation: { a: subregionSpec(subregion.pair.a), b: subregionSpec(subregion.pair.b) } } : { subregion: subregionSpec(subregion) }),
  };
}

type Elements = { points: Float64Array } | { words: Uint32Array };
type Value = { quantity: string; stored: number; recomputed: number };

/** What an entry states, beside the engine's value for it now; `parts` are A, B and A∪B of a pair, else the subregion's own. */
function valuesOf(entry: BundleEntropy, found: { n: number; S: number; SA?: number; SB?: number }): Value[] {
  return [
    { quantity: 'n', stored: entry.n, recomputed: found.n },
    { quantity: 'S', stored: entry.S, recomputed: found.S },
    ...(entry.pair && found.SA !== undefined && found.SB !== undefined
      ? [{ quantity: 'S_A', stored: entry.pair.SA, recomputed: found.SA }, { quantity: 'S_B', stored: entry.pair.SB, recomputed: found.SB }]
      : []),
  ];
}

/** One entry through computeVacuum: a run's path (either engine), one spectrum per entry. */
async function recomputeAlone(entry: BundleEntropy, elements: Elements): Promise<Value[]> {
  const result = await computeVacuum(requestOfEntry(entry, elements));
  if ('pair' in entry.subregion) {
    const pair = result.mutualInformation!;
    return valuesOf(entry, { n: pair.union.n, S: pair.union.S, SA: pair.a.S, SB: pair.b.S });
  }
  return valuesOf(entry, { n: result.entropy!.n, S: result.entropy!.S });
}

/**
 * How the study-cell path places the elements of a group, or null when it cannot say it exactly: it takes
 * either the region (then ρ = N/V) or a density, so a region is kept when ρ is N/V or when only its
 * periodic x matters and it has none (a Poisson sprinkling's ρ is its expected count over V).
 */
function cellPlacement(entry: BundleEntropy, elements: Elements): ImportedCellSource | null {
  if ('words' in elements) return { kind: 'order', causal: elements.words, count: entry.N, dimension: entry.dimension, density: entry.density };
  const { points } = elements;
  if (!entry.region) return { kind: 'points', points, dimension: entry.dimension, region: null, density: entry.density };
  const region = makeRegion(entry.region);
  const ratio = entry.N / region.volume;
  if (entry.density === null || Math.abs(entry.density - ratio) <= 1e-12 * ratio) return { kind: 'points', points, dimension: entry.dimension, region: entry.region, density: null };
  if (region.periodX === undefined) return { kind: 'points', points, dimension: entry.dimension, region: null, density: entry.density };
  return null;
}

const isTips = (part: object): part is { past: Event; future: Event } => 'past' in part;

/**
 * Every dense entry on one causal set with one placement and field, through the study-cell engine path
 * (server/studies/cell.ts): one spectrum for all their subregions and rules, as a study computed them.
 * Null when the group needs the run path (a pair of element lists, a placement the cell cannot state).
 */
async function recomputeAsCell(group: { k: number; entry: BundleEntropy }[], elements: Elements): Promise<Map<number, Value[]> | null> {
  const first = group[0]!.entry;
  const imported = cellPlacement(first, elements);
  if (!imported || group.some(({ entry }) => 'pair' in entry.subregion && !(isTips(entry.subregion.pair.a) && isTips(entry.subregion.pair.b)))) return null;
  const subregions = new Map<string, ResolvedSubregion>();
  const rules = new Map<string, StudyRule>();
  const keys = group.map(({ entry }) => {
    const text = JSON.stringify(entry.subregion);
    if (!subregions.has(text)) {
      const key = `subregion ${subregions.size + 1}`;
      const s = entry.subregion;
      subregions.set(
        text,
        'pair' in s
          ? { key, label: key, fraction: null, past: null, future: null, pair: { size: 0, separation: 0, a: s.pair.a as { past: Event; future: Event }, b: s.pair.b as { past: Event; future: Event } } }
          : 'elements' in s
            ? { key, label: key, fraction: null, past: null, future: null, elements: s.elements }
            : { key, label: key, fraction: null, past: s.past, future: s.future },
      );
    }
    const rule: StudyRule = { truncation: entry.rule.truncation, doubleTruncation: entry.rule.doubleTruncation, ...(entry.rule.restrictedCut ? { restrictedCut: entry.rule.restrictedCut } : {}) };
    rules.set(studyRuleKey(rule), rule);
    return { subregion: subregions.get(text)!.key, rule: studyRuleKey(rule) };
  });
  const result = await computeStudyCell({ imported, mass: first.mass, subregions: [...subregions.values()], rules: [...rules.values()] });
  const values = new Map<number, Value[]>();
  group.forEach(({ k, entry }, g) => {
    const found = result.entropies.find((e) => e.subregion === keys[g]!.subregion && e.rule === keys[g]!.rule)!;
    values.set(k, valuesOf(entry, { n: found.n, S: found.S, ...(found.pair ? { SA: found.pair.SA, SB: found.pair.SB } : {}) }));
  });
  return values;
}

/**
 * `tacet reproduce BUNDLE.zip [--json]`: checks the bundle's files against manifest.json, then computes
 * every entropy of the manifest again from the bundle's own points (one points file read at a time) and
 * compares. Prints { checked, maxRelDiff, ok, mismatches }; throws when refused or when a value differs.
 */
export async function reproduceBundle(path: string, options: { json: boolean }, io: ReproduceIo): Promise<ReproduceReport> {
  if (!existsSync(path)) throw new BundleRefusedError(`${path} does not exist`);
  const zip = await openZip(path);
  try {
    const entries = new Map((await listEntries(zip)).map((e) => [e.fileName, e]));
    const manifest = await verifiedManifest(zip, entries);
    io.stderr(`reproduce: ${entries.size - 1} files match their SHA-256; computing ${manifest.entropies.length} entropies again\n`);
    const byFile = new Map<string, number[]>();
    manifest.entropies.forEach((e, k) => byFile.set(e.points, [...(byFile.get(e.points) ?? []), k]));

    let checked = 0;
    let done = 0;
    let maxRelDiff = 0;
    const mismatches: ReproduceReport['mismatches'] = [];
    for (const [file, indices] of byFile) {
      const first = manifest.entropies[indices[0]!]!;
      const text = await textOf(zip, entries.get(file)!);
      let elements: Elements;
      try {
        elements = first.format === 'relations' ? { words: relationWordsFromCsv(text, first.N) } : { points: coordinatesFromCsv(text).points };
      } catch (error) {
        throw new BundleRefusedError(`${file}: ${(error as Error).message}`);
      }
      const record = (k: number, values: Value[]) => {
        for (const value of values) {
          checked += value.quantity === 'n' ? 0 : 1;
          const agrees = value.quantity === 'n' ? value.stored === value.recomputed : entropiesAgree(value.stored, value.recomputed);
          if (value.quantity !== 'n') maxRelDiff = Math.max(maxRelDiff, relativeDifference(value.stored, value.recomputed));
          if (!agrees) mismatches.push({ entry: k, ...value });
        }
        done++;
        const line = `reproduce: ${done}/${manifest.entropies.length} entropies (${file})`;
        io.stderr(io.progress ? `\r${line}` : `${line}\n`);
      };
      // entries on the same elements, placement and field share one spectrum (the dense engine's); the rest go one by one
      const groups = new Map<string, { k: number; entry: BundleEntropy }[]>();
      const alone: number[] = [];
      for (const k of indices) {
        const e = manifest.entropies[k]!;
        if (e.engine !== 'dense') {
          alone.push(k);
          continue;
        }
        const key = JSON.stringify([e.format, e.dimension, e.N, e.region, e.density, e.mass]);
        groups.set(key, [...(groups.get(key) ?? []), { k, entry: e }]);
      }
      for (const group of groups.values()) {
        const values = await recomputeAsCell(group, elements);
        if (!values) {
          alone.push(...group.map((g) => g.k));
          continue;
        }
        for (const { k } of group) record(k, values.get(k)!);
      }
      for (const k of alone.sort((a, b) => a - b)) record(k, await recomputeAlone(manifest.entropies[k]!, elements));
    }
    if (io.progress) io.stderr('\n');
    const report: ReproduceReport = { checked, maxRelDiff, ok: mismatches.length === 0, mismatches };
    if (options.json) io.stdout(JSON.stringify(report) + '\n');
    else {
      io.stdout(
        `${checked} entropies computed again from the bundle's points; largest relative difference ${maxRelDiff.toExponential(2)} ` +
          `(tolerance ${REPRODUCE_RELATIVE_TOLERANCE.toExponential(0)} relative + ${ENTROPY_FLOOR.toExponential(0)} absolute): ${report.ok ? 'ok' : `${mismatches.length} differ`}\n`,
      );
      for (const m of mismatches) io.stdout(`  entropy ${m.entry} (${manifest.entropies[m.entry]!.points}): ${m.quantity} stored ${m.stored}, computed ${m.recomputed}\n`);
    }
    if (!report.ok) throw new ReproductionMismatchError(`${mismatches.length} value(s) of the bundle differ from what its points give`);
    return report;
  } finally {
    zip.close();
  }
}
