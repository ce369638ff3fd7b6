import type { RunEntropiesExport, RunExportFormat, RunJsonExport, RunSpectrumExport } from '@shared/exports';
import type { EntropyPart, RunDetail, RunPoints, RunResult } from '@shared/runs';
import { renyiEntries, runNumbersLatex, runSettingsOf } from '@shared/runNumbers';
import { entropyRuleLabel, formatTruncationRule, restrictedCutText } from '@shared/vacuum';
import packageJson from '../../package.json' with { type: 'json' };

/** 17 significant digits: enough for every float64 to read back as the same number (IEEE 754 §5.12.2). */
const fullPrecision = (value: number) => value.toPrecision(17);

const csvLines = (header: string, rows: string[]) => [header, ...rows].join('\n') + '\n';

/** The elements, one row per element in element order: `t,x` or `t,x,y,z`. */
export function pointsCsv(points: Pick<RunPoints, 'columns' | 'points'>): string {
  return csvLines(points.columns.join(','), points.points.map((p) => p.map(fullPrecision).join(',')));
}

/**
 * The spectrum of iΔ's positive part, one row per eigenvalue in descending order: its rank from 1, the
 * value, the continuum diamond's value at that rank (empty without one) and whether the truncation kept it.
 */
export function spectrumCsv(spectrum: Pick<RunSpectrumExport, 'eigenvalues' | 'continuum' | 'modesKept'>): string {
  const { eigenvalues, continuum, modesKept } = spectrum;
  return csvLines(
    'rank,eigenvalue,continuum,kept',
    eigenvalues.map((value, k) => `${k + 1},${fullPrecision(value)},${continuum ? fullPrecision(continuum[k]!) : ''},${k < modesKept ? 1 : 0}`),
  );
}

/** The spectrum with its cut, as one compact JSON object; the run's Rényi, pair and complement entropies when it asked for them. */
export function spectrumJson(spectrum: RunSpectrumExport): string {
  const { eigenvalues, continuum, cutoff, modesKept, N, entropies } = spectrum;
  return JSON.stringify({ eigenvalues, continuum, cutoff, modesKept, N, ...(entropies ? { entropies } : {}) });
}

const cutOf = (part: Pick<EntropyPart, 'cutoff' | 'modesKept' | 'restrictedCut'>) => ({
  rule: part.restrictedCut ? restrictedCutText(part.restrictedCut) : null,
  cutoff: part.cutoff,
  modesKept: part.modesKept,
});

/**
 * S_α of the subregion, the pair's I(A:B) and the complement check as exports carry them, under the
 * names of server/engine/README.md §15; undefined when the run asked for none of the three (so the
 * exports of older runs read as before).
 */
export function entropiesExport(result: Pick<RunResult, 'entropy' | 'mutualInformation' | 'complement'>, rule: string): RunEntropiesExport | undefined {
  const { entropy, mutualInformation: pair, complement } = result;
  const renyi = entropy?.renyi ?? null;
  if (!renyi && !pair && !complement) return undefined;
  return {
    rule,
    subregion: entropy ? { S: entropy.S, n: entropy.n, cut: cutOf({ cutoff: entropy.cutoff ?? 0, modesKept: entropy.modesKept, restrictedCut: entropy.restrictedCut }), renyi } : null,
    mutualInformation: pair
      ? { SA: pair.a.S, SB: pair.b.S, SAB: pair.union.S, I: pair.I, nA: pair.a.n, nB: pair.b.n, nAB: pair.union.n, cuts: { A: cutOf(pair.a), B: cutOf(pair.b), AB: cutOf(pair.union) } }
      : null,
    complement:
      complement && entropy
        ? { SO: entropy.S, SOprime: complement.S, nO: entropy.n, nOprime: complement.n, difference: complement.difference, cut: cutOf(complement) }
        : null,
  };
}

/** A run's detail as its whole-run exports read it: done, with its result. */
export type DoneRunDetail = Pick<
  RunDetail,
  'id' | 'title' | 'status' | 'author' | 'parentRunId' | 'createdAt' | 'startedAt' | 'finishedAt' | 'dimension' | 'regionKind' | 'request'
> & { result: RunResult };

const csvNumber = (value: number | null | undefined) => (value === null || value === undefined ? '' : fullPrecision(value));

/** A CSV field: quoted when it holds a comma, a quote or a line break (RFC 4180). */
const csvField = (text: string) => (/[",\r\n]/.test(text) ? `"${text.replace(/"/g, '""')}"` : text);

/**
 * Every entropy of a run in one tidy table, one row per value: `quantity` S (von Neumann), S_alpha
 * (Rényi, `alpha` its order, "inf" for the min-entropy), I (the pair's mutual information) or
 * difference (S_O′ − S_O); `part` O (the subregion), A, B, AB (A∪B), Oprime (the causal complement)
 * or A:B; with each part's n, modes kept, restricted |λ| cut and its rule. A run without a subregion or
 * pair gives the header alone.
 */
export function entropyCsv(result: Pick<RunResult, 'entropy' | 'mutualInformation' | 'complement'>): string {
  const rows: string[] = [];
  const row = (quantity: string, part: string, alpha: string, n: number | null, value: number, cut: Pick<EntropyPart, 'modesKept' | 'cutoff' | 'restrictedCut'> | null) =>
    rows.push(
      [quantity, part, alpha, n === null ? '' : String(n), fullPrecision(value), cut ? String(cut.modesKept) : '', cut ? csvNumber(cut.cutoff) : '', cut?.restrictedCut ? csvField(restrictedCutText(cut.restrictedCut)) : '']
        .join(','),
    );
  const { entropy, mutualInformation: pair, complement } = result;
  if (entropy) {
    const cut = { modesKept: entropy.modesKept, cutoff: entropy.cutoff ?? 0, restrictedCut: entropy.restrictedCut ?? null };
    row('S', 'O', '1', entropy.n, entropy.S, cut);
    for (const { key, value } of renyiEntries(entropy)) row('S_alpha', 'O', key, entropy.n, value, cut);
  }
  if (pair) {
    row('S', 'A', '1', pair.a.n, pair.a.S, pair.a);
    row('S', 'B', '1', pair.b.n, pair.b.S, pair.b);
    row('S', 'AB', '1', pair.union.n, pair.union.S, pair.union);
    row('I', 'A:B', '1', null, pair.I, null);
  }
  if (complement && entropy) {
    row('S', 'Oprime', '1', complement.n, complement.S, complement);
    row('difference', 'Oprime-O', '1', null, complement.difference, null);
  }
  return csvLines('quantity,part,alpha,n,value,modes_kept,cutoff,restricted_cut', rows);
}

/**
 * The subregion's generalised eigenvalues μ of W v = μ iΔ v (server/engine/README.md §9), descending
 * as the engine gives them, in pairs (μ, 1 − μ); the header alone without a subregion.
 */
export function generalizedEigenvaluesCsv(result: Pick<RunResult, 'entropy'>): string {
  const mu = result.entropy?.generalizedEigenvalues ?? [];
  return csvLines('rank,mu', mu.map((value, k) => `${k + 1},${fullPrecision(value)}`));
}

/** Tacet's own version (package.json), beside the engine's, so a reader knows which release wrote the file. */
export const tacetVersion: string = packageJson.version;

/** The whole run as `run.json` gives it (shared/exports.ts runJsonExportSchema). */
export function runJsonExport(run: DoneRunDetail, spectrum: RunSpectrumExport, exportedAt: Date = new Date()): RunJsonExport {
  const { result } = run;
  const settings = runSettingsOf(run.request);
  const entropy = result.entropy;
  return {
    format: 'tacet-run/1',
    exportedAt: exportedAt.toISOString(),
    run: {
      id: run.id,
      title: run.title,
      status: run.status,
      author: run.author.name,
      parentRunId: run.parentRunId,
      createdAt: run.createdAt,
      startedAt: run.startedAt,
      finishedAt: run.finishedAt,
    },
    request: run.request,
    settings: {
      dimension: run.dimension,
      regionKind: run.regionKind,
      region: settings.region,
      causalSet: settings.causalSet,
      seed: settings.seed,
      prng: settings.prng,
      process: settings.process,
      mass: settings.mass,
      truncation: formatTruncationRule(settings.truncation),
      entropyRule: entropyRuleLabel(settings),
      restrictedCut: settings.restrictedCut ? restrictedCutText(settings.restrictedCut) : null,
      engineRequest: settings.engineRequest,
    },
    provenance: {
      tacetVersion,
      engineVersion: result.engineVersion,
      backend: result.backend,
      engine: result.engine ?? 'dense',
      engineReason: result.engineReason ?? null,
      timings: result.timings,
    },
    causalSet: { N: result.N, density: result.density, volume: result.volume, relations: result.relations, links: result.links },
    spectrum: {
      eigenvalues: spectrum.eigenvalues,
      continuum: spectrum.continuum,
      cutoff: spectrum.cutoff,
      modesKept: spectrum.modesKept,
      N: spectrum.N,
      knee: result.knee,
    },
    diagnostics: result.diagnostics,
    cautions: result.cautions ?? [],
    subregion: entropy
      ? {
          S: entropy.S,
          n: entropy.n,
          modesKept: entropy.modesKept,
          cutoff: entropy.cutoff ?? null,
          restrictedCut: entropy.restrictedCut ? restrictedCutText(entropy.restrictedCut) : null,
          renyi: entropy.renyi ?? null,
          generalizedEigenvalues: entropy.generalizedEigenvalues,
        }
      : null,
    entropies: entropiesExport(result, entropyRuleLabel(settings)) ?? null,
  };
}

/** What a run's renderers read; each loads only when asked, so an export loads only what it needs. */
export interface RunExportSource {
  points(): Promise<Pick<RunPoints, 'columns' | 'points'>>;
  spectrum(): Promise<RunSpectrumExport>;
  /** the run's detail; the whole-run exports need its result (the run is done) */
  run(): Promise<RunDetail>;
}

/** The run with its result, or an error that says the run is not done. */
function withResult(run: RunDetail): DoneRunDetail {
  if (!run.result) throw new Error(`Run ${run.id} is ${run.status}; its numbers are exported once it is done.`);
  return { ...run, result: run.result };
}

/** One renderer per format of shared/exports.ts `runExports`. */
export const runRenderers: Record<RunExportFormat, (source: RunExportSource) => Promise<string>> = {
  'points.csv': async (source) => pointsCsv(await source.points()),
  'spectrum.csv': async (source) => spectrumCsv(await source.spectrum()),
  'spectrum.json': async (source) => spectrumJson(await source.spectrum()),
  'entropy.csv': async (source) => entropyCsv(withResult(await source.run()).result),
  'generalized.csv': async (source) => generalizedEigenvaluesCsv(withResult(await source.run()).result),
  'run.json': async (source) => {
    const [run, spectrum] = await Promise.all([source.run(), source.spectrum()]);
    return JSON.stringify(runJsonExport(withResult(run), spectrum), null, 2) + '\n';
  },
  'numbers.tex': async (source) => runNumbersLatex(withResult(await source.run())),
};
