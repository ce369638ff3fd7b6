import { existsSync, readFileSync } from 'node:fs';
import type { Writable } from 'node:stream';
import type { DataSource } from 'typeorm';
import { createRunBundleRequestSchema, type BundleEntropy, type BundleSubregion } from '@shared/bundles';
import { studyExportFormats, type StudyExportFormat } from '@shared/exports';
import { regionDimension } from '@shared/regions';
import { createStudyRequestSchema, fitQuantity, studyRuleKey, studyRuleLabel, type CreateStudyRequest, type ResolvedSubregion, type StudyEntropy, type StudyRule } from '@shared/studies';
import { entropyRuleLabel, sprinklingSpecSchema, type RegionSpec, type SubregionSpec } from '@shared/vacuum';
import { decodeFloat64, decodeRelationWords } from '../../db/codecs';
import * as runRows from '../../db/repositories/runs';
import type { RunWithAuthor } from '../../db/repositories/runs';
import * as studyRows from '../../db/repositories/studies';
import type { StudyWithAuthor } from '../../db/repositories/studies';
import type { StudyCellRow } from '../../db/study-entities';
import { ENGINE_VERSION } from '../../engine/index';
import { continuumSpectrumFor } from '../../engine/regions';
import { sprinkle } from '../../engine/sprinkle';
import { BundleWriter } from '../../exports/bundle/writer';
import { bundleReadme, coordinatesCsv, fileSlug, relationsCsv, runEntropiesCsv, runEntropiesLatex } from '../../exports/bundle/files';
import { entropyScalingFigure, pdfFigure, spectrumFigure, svgFigure, type EntropyScalingRule, type FigureSpec, type SpectrumCurve } from '../../exports/figures/index';
import { spectrumCsv } from '../../exports/runs';
import { bibtex } from '../../exports/studies';
import { aggregateEntropies, fitAggregates } from '../../studies/aggregate';
import type { StudyCellEntropy } from '../../studies/cell';
import { cellSprinkling } from '../../studies/plan';
import type { StoredRunRequest } from '../../runs/request';
import type { TeamContext } from '../context';
import { conflict, notFound } from '../errors';
import type { RunService } from './runs';
import type { StudyService } from './studies';

const uuidPattern = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

/** A bundle checked and ready to stream: its name, how many files it will hold, and the writer. */
export interface PreparedBundle {
  filename: string;
  fileCount: number;
  write(output: Writable): Promise<void>;
}

/** Where each study export goes in the zip. */
const studyExportPaths: Record<StudyExportFormat, { path: string; what: string }> = {
  csv: { path: 'tables/entropies.csv', what: 'every entropy: one row per N, seed, subregion and rule (17 significant digits)' },
  'aggregates-csv': { path: 'tables/aggregates.csv', what: 'the ensemble over seeds: mean n, mean S, deviation, standard error' },
  latex: { path: 'tables/entropies.tex', what: 'the table for the paper (booktabs), ⟨S⟩ ± SE per rule with the fits' },
  json: { path: 'provenance.json', what: 'the request, seeds, rules, engine version, backend, times and every number' },
  methods: { path: 'methods.txt', what: 'the methods paragraph, with citations and cautions' },
  bibtex: { path: 'references.bib', what: 'BibTeX of the published methods used' },
};

const figureFiles = (name: string, what: string) => [
  { path: `figures/${name}.svg`, what: `${what} (SVG)` },
  { path: `figures/${name}.pdf`, what: `${what} (PDF)` },
];

/**
 * A TrueType font with λ, ℓ, √, ⟨⟩ and the subscripts, for the PDF figures (DejaVu Sans has them all; its
 * serif lacks ℓ); null falls back to spelled-out symbols.
 */
let figureFont: Buffer | null | undefined;
function loadFigureFont(): Buffer | null {
  if (figureFont === undefined) {
    const path = ['/usr/share/fonts/truetype/dejavu/DejaVuSans.ttf'].find((p) => existsSync(p));
    figureFont = path ? readFileSync(path) : null;
  }
  return figureFont;
}

async function addFigure(writer: BundleWriter, name: string, spec: FigureSpec): Promise<void> {
  await writer.add(`figures/${name}.svg`, svgFigure(spec));
  await writer.add(`figures/${name}.pdf`, await pdfFigure(spec, { font: loadFigureFont() }));
}

/** Lets the API answer other requests between two cells of a large bundle. */
const breathe = () => new Promise((resolve) => setImmediate(resolve));

const tipsOf = (s: SubregionSpec) => (s.kind === 'diamond' ? { past: s.past, future: s.future } : { elements: s.indices });

function studySubregion(s: ResolvedSubregion): BundleSubregion {
  if (s.pair) return { pair: { a: s.pair.a, b: s.pair.b } };
  if (s.elements) return { elements: s.elements };
  return { past: s.past!, future: s.future! };
}

function ruleOf(rule: StudyRule): BundleEntropy['rule'] {
  return { truncation: rule.truncation, doubleTruncation: rule.doubleTruncation, ...(rule.restrictedCut ? { restrictedCut: rule.restrictedCut } : {}) };
}

export type BundleService = ReturnType<typeof createBundleService>;

/**
 * Supplementary bundles (issue 17 §1): one zip of a study or of chosen runs, streamed file by file. The
 * tables, methods and BibTeX are the study exports' own renderers; a sprinkling's points are drawn again
 * from its stored specification and seed as the zip is written, an imported set's come from its copy.
 */
export function createBundleService(deps: { dataSource: DataSource; studies: StudyService; runs: RunService }) {
  const { dataSource, studies, runs } = deps;
  const m = dataSource.manager;

  async function studyInTeam(team: TeamContext, id: string): Promise<StudyWithAuthor> {
    const row = uuidPattern.test(id) ? await studyRows.findStudyInTeam(m, team.id, id.toLowerCase()) : null;
    if (!row) throw notFound('Study not found.');
    return row;
  }

  /** The elements of one done cell as a CSV, and what its manifest entries say about them. */
  async function cellElements(row: StudyWithAuthor, request: CreateStudyRequest, cell: StudyCellRow, position: number) {
    const base = `cell-${String(position + 1).padStart(3, '0')}_N-${cell.n}`;
    if (request.source === 'sprinkled') {
      const drawn = sprinkle(sprinklingSpecSchema.parse(cellSprinkling(request, cell.requestedN, cell.seed)));
      // the same engine draws the same points from the same seed; anything else would make the bundle lie
      if (drawn.count !== cell.n) throw new Error(`the sprinkling of cell ${cell.id} drew ${drawn.count} elements again, not the ${cell.n} it was computed on`);
      const dimension = regionDimension(request.region.kind);
      return {
        path: `points/${base}_seed-${fileSlug(cell.seed)}.csv`,
        body: coordinatesCsv(drawn.points, dimension),
        format: 'coordinates' as const,
        dimension,
        seed: cell.seed,
        region: request.region as RegionSpec,
        regionKind: request.region.kind as string,
      };
    }
    const set = (row.causalSets ?? []).find((s) => s.id === cell.seed);
    const stored = await studyRows.cellElements(m, cell.id);
    if (!set || !stored) throw new Error(`cell ${cell.id} has lost its imported causal set`);
    const name = `${base}_${fileSlug(set.name)}`;
    if (set.kind === 'relations') {
      return { path: `relations/${name}.csv`, body: relationsCsv(decodeRelationWords(stored, set.N), set.N), format: 'relations' as const, dimension: set.dimension, seed: null, region: null, regionKind: null };
    }
    return { path: `points/${name}.csv`, body: coordinatesCsv(decodeFloat64(stored), set.dimension), format: 'coordinates' as const, dimension: set.dimension, seed: null, region: set.region, regionKind: set.region?.kind ?? null };
  }

  async function studyFigures(team: TeamContext, id: string) {
    const detail = await studies.get(team, id);
    const label = (key: string) => detail.ruleLabels[key] ?? key;
    const rules: EntropyScalingRule[] = Object.keys(detail.ruleLabels).map((key) => {
      const fit = detail.fits.find((f) => f.rule === key && f.subregion === null && f.model === 'log' && fitQuantity(f) === 'S');
      return {
        label: label(key),
        points: detail.aggregates.filter((a) => a.rule === key).map((a) => ({ n: a.meanN, S: a.meanS, se: a.seS })),
        fit: fit ? { slope: fit.slope, intercept: fit.intercept, slopeError: fit.slopeError } : null,
      };
    });
    const kind = detail.regionKind;
    const curves: SpectrumCurve[] = detail.spectra.map((s) => ({
      label: `N = ${s.elements} (seed ${s.seed.length > 12 ? `${s.seed.slice(0, 12)}…` : s.seed})`,
      eigenvalues: s.eigenvalues,
      continuum: continuumSpectrumFor(kind, s.elements, s.eigenvalues.length),
      cuts: s.cuts.map((c) => ({ label: label(c.rule), cutoff: c.cutoff })),
    }));
    const name = detail.title ?? `study ${detail.id.slice(0, 8)}`;
    return {
      entropy: entropyScalingFigure(`Entanglement entropy against ln √n — ${name}`, rules),
      spectrum: spectrumFigure(`Spectrum of iΔ against the continuum — ${name}`, curves),
    };
  }

  async function runInTeam(team: TeamContext, id: string): Promise<RunWithAuthor> {
    const row = await runRows.findRunInTeam(m, team.id, id.toLowerCase());
    // a run of another team reads exactly like a missing one
    if (!row) throw notFound(`No run ${id} exists in this team.`);
    if (row.status !== 'done' || !row.summary || row.n === null) {
      throw conflict('run_not_done', `Run ${id.slice(0, 8)} is ${row.status}; a bundle takes done runs only.`);
    }
    return row;
  }

  /** The manifest entries of one done run: its subregion's entropy and its pair's, when it asked for them. */
  function runEntries(row: RunWithAuthor, path: string, format: BundleEntropy['format']): BundleEntropy[] {
    const request = row.request as unknown as StoredRunRequest;
    const summary = row.summary!;
    const rule: StudyRule = { truncation: request.truncation, doubleTruncation: request.doubleTruncation, ...(request.restrictedCut ? { restrictedCut: request.restrictedCut } : {}) };
    const common = {
      source: { kind: 'run' as const, id: row.id },
      points: path,
      format,
      dimension: row.dimension,
      seed: request.sprinkling?.seed ?? null,
      N: row.n!,
      region: request.sprinkling?.region ?? request.causalSet?.region ?? null,
      density: summary.density,
      mass: request.mass,
      engine: summary.engine ?? ('dense' as const),
      ruleKey: studyRuleKey(rule),
      rule: ruleOf(rule),
    };
    const entries: BundleEntropy[] = [];
    if (summary.entropy && request.subregion) {
      entries.push({ ...common, subregion: tipsOf(request.subregion), subregionKey: 'subregion', n: summary.entropy.n, S: summary.entropy.S });
    }
    const pair = summary.mutualInformation;
    if (pair && request.mutualInformation) {
      entries.push({
        ...common,
        subregion: { pair: { a: tipsOf(request.mutualInformation.a), b: tipsOf(request.mutualInformation.b) } },
        subregionKey: 'pair A, B',
        n: pair.union.n,
        S: pair.union.S,
        pair: { SA: pair.a.S, SB: pair.b.S, I: pair.I },
      });
    }
    return entries;
  }

  return {
    /** GET /api/studies/:id/bundle: refused (404, 409) before anything is sent. */
    async prepareStudyBundle(team: TeamContext, id: string): Promise<PreparedBundle> {
      const row = await studyInTeam(team, id);
      const cells = await studyRows.cellsOfStudy(m, row.id);
      const done = cells.filter((c) => c.status === 'done' && c.result && c.n !== null);
      if (done.length === 0) throw conflict('study_not_ready', `The study is ${row.status} and no sprinkling has finished yet; a bundle needs at least one.`);
      const request = createStudyRequestSchema.parse(row.request);
      const figures = [...figureFiles('entropy-scaling', 'S against ln √n per rule, ⟨S⟩ ± SE with the fit S = b ln √n + c'), ...figureFiles('spectra', 'the positive eigenvalues λₖ of iΔ of one sprinkling per N against the continuum, with the cuts')];
      const unit = request.source === 'sprinkled' ? 'sprinkling' : 'imported causal set';
      const listed = [
        ...studyExportFormats.map((f) => studyExportPaths[f]),
        ...figures,
        { path: request.source === 'sprinkled' ? 'points/' : 'points/ or relations/', what: `the elements of each ${unit} (t,x[,y,z] in element order, 17 significant digits; a relation list as i,j rows of the closed order)` },
        { path: 'spectra/', what: `the spectrum of each ${unit}: rank, eigenvalue, continuum, kept (under the study's first rule)` },
      ];
      const fileCount = 1 + studyExportFormats.length + figures.length + 2 * done.length + 1;
      const title = row.title ?? `study ${row.id.slice(0, 8)}`;
      return {
        filename: `tacet-study-${row.id.slice(0, 8)}-bundle.zip`,
        fileCount,
        write: async (output) => {
          const writer = new BundleWriter(output);
          try {
            await writer.add(
              'README.md',
              bundleReadme({
                heading: `Supplementary material: ${title}`,
                lines: [
                  `A scaling study computed with Tacet (${ENGINE_VERSION}): ${done.length} of ${cells.length} ${unit}s done, ${request.rules.length} rule${request.rules.length === 1 ? '' : 's'} (${request.rules.map((r) => studyRuleLabel(r)).join('; ')}), by ${row.authorName}.`,
                  request.source === 'sprinkled'
                    ? `Each sprinkling's points were drawn again from its seed (${request.prng}, ${request.process === 'fixed' ? 'fixed N' : 'Poisson'}) when this bundle was written, and checked to give the N it was computed on.`
                    : 'The elements are the study\'s copies of the imported causal sets.',
                ],
                files: listed,
              }),
            );
            for (const format of studyExportFormats) {
              const file = await studies.exportStudy(team, row.id, format);
              await writer.add(studyExportPaths[format].path, file.body);
            }
            const plots = await studyFigures(team, row.id);
            await addFigure(writer, 'entropy-scaling', plots.entropy);
            await addFigure(writer, 'spectra', plots.spectrum);

            const entries: BundleEntropy[] = [];
            const subregions = new Map(row.subregions.map((s) => [s.key, s]));
            const rules = new Map(request.rules.map((r) => [studyRuleKey(r), r]));
            for (const [position, cell] of cells.entries()) {
              if (!done.includes(cell)) continue;
              const elements = await cellElements(row, request, cell, position);
              await writer.add(elements.path, elements.body);
              const stored = (await studyRows.eigenvaluesOfCells(m, [cell.id])).get(cell.id);
              const eigenvalues = stored ? Array.from(decodeFloat64(stored)) : [];
              const continuum = elements.regionKind ? continuumSpectrumFor(elements.regionKind, cell.n!, eigenvalues.length) : null;
              const modesKept = cell.result!.states[0]?.modesKept ?? eigenvalues.length;
              await writer.add(elements.path.replace(/^(points|relations)\//, 'spectra/'), spectrumCsv({ eigenvalues, continuum: continuum ? Array.from(continuum) : null, modesKept }));
              for (const e of cell.result!.entropies as StudyCellEntropy[]) {
                const subregion = subregions.get(e.subregion);
                const rule = rules.get(e.rule);
                if (!subregion || !rule) throw new Error(`cell ${cell.id} holds an entropy of ${e.subregion} under ${e.rule}, which the study no longer names`);
                entries.push({
                  source: { kind: 'study-cell', id: cell.id },
                  points: elements.path,
                  format: elements.format,
                  dimension: elements.dimension,
                  seed: elements.seed,
                  N: cell.n!,
                  region: elements.region,
                  density: cell.result!.density,
                  mass: request.mass,
                  engine: 'dense',
                  ruleKey: e.rule,
                  rule: ruleOf(rule),
                  subregion: studySubregion(subregion),
                  subregionKey: e.subregion,
                  n: e.n,
                  S: e.S,
                  ...(e.pair ? { pair: { SA: e.pair.SA, SB: e.pair.SB, I: e.pair.I } } : {}),
                });
              }
              await breathe();
            }
            await writer.finish({ format: 'tacet-bundle/1', kind: 'study', ids: [row.id], createdAt: new Date().toISOString(), engineVersion: ENGINE_VERSION, entropies: entries });
          } catch (error) {
            writer.abort();
            throw error;
          }
        },
      };
    },

    /** POST /api/bundles: every run must be a done run of the team (else 404 or 409 naming it). */
    async prepareRunBundle(team: TeamContext, body: unknown): Promise<PreparedBundle> {
      const { runIds } = createRunBundleRequestSchema.parse(body);
      const rows: RunWithAuthor[] = [];
      for (const id of runIds) rows.push(await runInTeam(team, id));
      const figures = [...figureFiles('entropy-scaling', 'S against ln √n per rule (runs of equal N averaged, ± SE) with the fit S = b ln √n + c'), ...figureFiles('spectra', 'each run\'s positive eigenvalues λₖ of iΔ against the continuum, with its cut')];
      const fileCount = 1 + 3 * rows.length + 2 + 2 + figures.length + 1;
      return {
        filename: `tacet-runs-${rows.length}-bundle.zip`,
        fileCount,
        write: async (output) => {
          const writer = new BundleWriter(output);
          try {
            const hasPair = rows.some((r) => (r.request as unknown as StoredRunRequest).mutualInformation);
            await writer.add(
              'README.md',
              bundleReadme({
                heading: `Supplementary material: ${rows.length} vacuum run${rows.length === 1 ? '' : 's'}`,
                lines: [`Vacuum runs computed with Tacet (${ENGINE_VERSION}): ${rows.map((r) => `${r.title ? `"${r.title}" ` : ''}${r.id}`).join(', ')}.`],
                files: [
                  { path: 'points/ or relations/', what: 'the elements of each run (t,x[,y,z] in element order, 17 significant digits; a relation list as i,j rows of the closed order)' },
                  { path: 'spectra/run-ID.csv, spectra/run-ID.json', what: 'each run\'s spectrum: rank, eigenvalue, continuum, kept; and as JSON with the cut and the entropies' },
                  { path: 'tables/entropies.csv', what: 'one row per entropy: run, N, seed, rule, subregion, n, S (and S_A, S_B, I of a pair)' },
                  { path: 'tables/entropies.tex', what: 'the same as a booktabs table' },
                  { path: 'methods.txt', what: 'what was computed, in one paragraph' },
                  { path: 'references.bib', what: 'BibTeX of the published methods used' },
                  ...figures,
                ],
              }),
            );
            const entries: BundleEntropy[] = [];
            const curves: SpectrumCurve[] = [];
            const tidy: StudyEntropy[] = [];
            const ruleLabels: Record<string, string> = {};
            for (const row of rows) {
              const request = row.request as unknown as StoredRunRequest;
              const name = `run-${row.id.slice(0, 8)}`;
              let path: string;
              let format: BundleEntropy['format'];
              if (request.causalSet?.kind === 'relations') {
                const stored = await runRows.loadRunArrays(m, team.id, row.id, ['relation']);
                if (!stored?.relation) throw new Error(`run ${row.id} has lost the relation of its causal set`);
                path = `relations/${name}.csv`;
                format = 'relations';
                await writer.add(path, relationsCsv(decodeRelationWords(stored.relation, row.n!), row.n!));
              } else {
                path = `points/${name}.csv`;
                format = 'coordinates';
                await writer.add(path, (await runs.exportRun(team, row.id, 'points.csv')).body);
              }
              await writer.add(`spectra/${name}.csv`, (await runs.exportRun(team, row.id, 'spectrum.csv')).body);
              await writer.add(`spectra/${name}.json`, (await runs.exportRun(team, row.id, 'spectrum.json')).body);
              const detail = await runs.get(team, row.id);
              const runEntriesOf = runEntries(row, path, format);
              entries.push(...runEntriesOf);
              ruleLabels[studyRuleKey({ truncation: request.truncation, doubleTruncation: request.doubleTruncation, restrictedCut: request.restrictedCut })] = entropyRuleLabel(request);
              if (detail.result) {
                curves.push({ label: `run ${row.id.slice(0, 8)} (N = ${row.n})`, eigenvalues: detail.result.eigenvalues, continuum: detail.result.continuum, cuts: request.truncation.rule === 'none' ? [] : [{ label: row.truncationText, cutoff: detail.result.cutoff }] });
              }
              for (const e of runEntriesOf.filter((x) => !x.pair)) {
                tidy.push({ cellId: row.id, N: row.n!, elements: row.n!, seed: e.seed ?? row.id, subregion: e.subregionKey, fraction: null, rule: e.ruleKey, n: e.n, S: e.S, modesKept: 0, cutoff: 0, stateModesKept: row.summary!.modesKept, stateCutoff: row.summary!.cutoff });
              }
              await breathe();
            }
            await writer.add('tables/entropies.csv', runEntropiesCsv(entries));
            await writer.add('tables/entropies.tex', runEntropiesLatex(entries, ruleLabels));
            const rules: StudyRule[] = Object.keys(ruleLabels).map((key) => {
              const row = rows.find((r) => entries.some((e) => e.source.id === r.id && e.ruleKey === key)) ?? rows.find((r) => {
                const q = r.request as unknown as StoredRunRequest;
                return studyRuleKey({ truncation: q.truncation, doubleTruncation: q.doubleTruncation, restrictedCut: q.restrictedCut }) === key;
              })!;
              const q = row.request as unknown as StoredRunRequest;
              return { truncation: q.truncation, doubleTruncation: q.doubleTruncation, ...(q.restrictedCut ? { restrictedCut: q.restrictedCut } : {}) };
            });
            await writer.add('methods.txt', runMethods(rows, ruleLabels));
            // the references follow the rules and whether a pair was asked, as a study's do
            await writer.add('references.bib', bibtex({ source: 'imported', causalSetIds: [], subregions: hasPair ? { kind: 'pairs', sizes: [0.5], separations: [0.1] } : { kind: 'tips', diamonds: [] }, rules, mass: 0 }));
            const aggregates = aggregateEntropies(tidy);
            const fits = fitAggregates(aggregates);
            const scaling: EntropyScalingRule[] = Object.keys(ruleLabels).map((key) => {
              const fit = fits.find((f) => f.rule === key && f.subregion === null && f.model === 'log' && fitQuantity(f) === 'S');
              return {
                label: ruleLabels[key]!,
                points: aggregates.filter((a) => a.rule === key).map((a) => ({ n: a.meanN, S: a.meanS, se: a.seS })),
                fit: fit ? { slope: fit.slope, intercept: fit.intercept, slopeError: fit.slopeError } : null,
              };
            });
            await addFigure(writer, 'entropy-scaling', entropyScalingFigure('Entanglement entropy against ln √n — vacuum runs', scaling));
            await addFigure(writer, 'spectra', spectrumFigure('Spectrum of iΔ against the continuum — vacuum runs', curves));
            await writer.finish({ format: 'tacet-bundle/1', kind: 'runs', ids: rows.map((r) => r.id), createdAt: new Date().toISOString(), engineVersion: ENGINE_VERSION, entropies: entries });
          } catch (error) {
            writer.abort();
            throw error;
          }
        },
      };
    },
  };
}

/** A short methods paragraph for a set of runs: where the elements came from, what was computed, under which rules. */
function runMethods(rows: RunWithAuthor[], ruleLabels: Record<string, string>): string {
  const origins = rows.map((r) => {
    const q = r.request as unknown as StoredRunRequest;
    if (q.causalSet) return `run ${r.id.slice(0, 8)}: the imported causal set "${q.causalSet.name}" (SHA-256 ${q.causalSet.checksum}), N = ${r.n}`;
    if (q.reusedPoints) return `run ${r.id.slice(0, 8)}: the points of run ${q.reusedPoints.runId.slice(0, 8)}, N = ${r.n}`;
    return `run ${r.id.slice(0, 8)}: a ${q.sprinkling?.process === 'poisson' ? 'Poisson' : 'fixed-N'} sprinkling of ${q.sprinkling?.region.kind ?? 'its region'}, N = ${r.n}, seed ${q.sprinkling?.seed ?? '—'} (${q.sprinkling?.prng ?? ''})`;
  });
  const masses = [...new Set(rows.map((r) => (r.request as unknown as StoredRunRequest).mass))];
  const versions = [...new Set(rows.map((r) => r.engineVersion).filter((v): v is string => v !== null))];
  return (
    [
      `We computed ${rows.length} vacuum run${rows.length === 1 ? '' : 's'} of a free scalar field (${masses.map((mass) => (mass > 0 ? `m = ${mass}` : 'massless')).join(', ')}) on causal sets: ${origins.join('; ')}.`,
      `On each we built the retarded Green function, the Pauli–Jordan operator iΔ and the Sorkin–Johnston state as the positive spectral part of iΔ, and, where a subregion was given, Sorkin's spacetime entanglement entropy S = Σ μ ln|μ| from the generalised eigenvalue problem restricted to it (references.bib), under the rule${Object.keys(ruleLabels).length === 1 ? '' : 's'} ${Object.values(ruleLabels).join('; ')}.`,
      `Each run's settings (region, density, mass, rule, restricted cut, subregion) are in manifest.json beside its points, so every S can be computed again (tacet reproduce).`,
      `Computed with ${versions.join(', ') || ENGINE_VERSION}. Cautions: these are single finite causal sets, so finite-size effects and the scatter between realisations are not averaged out, and the truncation rule is a modelling choice that changes S.`,
    ].join(' ') + '\n'
  );
}
