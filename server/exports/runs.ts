import type { RunExportFormat, RunSpectrumExport } from '@shared/exports';
import type { RunPoints } from '@shared/runs';

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

/** The spectrum with its cut, as one compact JSON object. */
export function spectrumJson(spectrum: RunSpectrumExport): string {
  const { eigenvalues, continuum, cutoff, modesKept, N } = spectrum;
  return JSON.stringify({ eigenvalues, continuum, cutoff, modesKept, N });
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
