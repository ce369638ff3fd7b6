import type { RunEntropiesExport, RunExportFormat, RunSpectrumExport } from '@shared/exports';
import type { EntropyPart, RunPoints, RunResult } from '@shared/runs';
import { restrictedCutText } from '@shared/vacuum';

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

/** What a run's renderers read; each loads only when asked, so an export loads only what it needs. */
export interface RunExportSource {
  points(): Promise<Pick<RunPoints, 'columns' | 'points'>>;
  spectrum(): Promise<RunSpectrumExport>;
}

/** One renderer per format of shared/exports.ts `runExports`. */
export const runRenderers: Record<RunExportFormat, (source: RunExportSource) => Promise<string>> = {
  'points.csv': async (source) => pointsCsv(await source.points()),
  'spectrum.csv': async (source) => spectrumCsv(await source.spectrum()),
  'spectrum.json': async (source) => spectrumJson(await source.spectrum()),
};
