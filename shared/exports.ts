import { z } from 'zod';

/**
 * Every file a run or a study downloads as, in one table read by the API (its routes, content types,
 * attachment names and OpenAPI description) and by the client (its download buttons). Each format's
 * renderer is in server/exports/; the tables are `Record<format, row>` and the renderers
 * `Record<format, renderer>`, so a format missing either is a compile error.
 */
export interface ExportFormatRow {
  /** the download button's text */
  label: string;
  /** the line beside the button */
  note: string;
  /** the Content-Type the API sends */
  contentType: string;
  /** what follows `tacet-<run|study>-<first 8 characters of the id>` in the file name, before the extension */
  nameSuffix: string;
  extension: string;
}

/** A run's exports; the format is also the last segment of its URL, `/api/runs/:id/<format>`. */
export const runExportFormats = ['points.csv', 'spectrum.csv', 'spectrum.json', 'entropy.csv', 'generalized.csv', 'run.json', 'numbers.tex'] as const;
export type RunExportFormat = (typeof runExportFormats)[number];

/** One restricted cut as exports give it: the rule's text ("√n/(4π)", "λ = 0.2") and the |λ| it came to; rule null without double truncation. */
const exportedCutSchema = z.object({ rule: z.string().nullable(), cutoff: z.number(), modesKept: z.number().int() });

/**
 * The subregion's Rényi entropies, the pair's mutual information and the complement check, in
 * `spectrum.json` when the run asked for any of them (server/engine/README.md §15).
 */
export const runEntropiesExportSchema = z.object({
  /** the entropy rule, as the run page names it */
  rule: z.string(),
  /** the subregion O: S (= S_1), n, and S_α by order ("0.5", "2", "inf") when asked */
  subregion: z.object({ S: z.number(), n: z.number().int(), cut: exportedCutSchema, renyi: z.record(z.string(), z.number()).nullable() }).nullable(),
  /** I(A:B) = S_A + S_B − S_AB with each part's size and cut */
  mutualInformation: z
    .object({ SA: z.number(), SB: z.number(), SAB: z.number(), I: z.number(), nA: z.number().int(), nB: z.number().int(), nAB: z.number().int(), cuts: z.object({ A: exportedCutSchema, B: exportedCutSchema, AB: exportedCutSchema }) })
    .nullable(),
  /** S_O and S_O′ of the causal complement O′ in the region, and S_O′ − S_O (a purity diagnostic) */
  complement: z.object({ SO: z.number(), SOprime: z.number(), nO: z.number().int(), nOprime: z.number().int(), difference: z.number(), cut: exportedCutSchema }).nullable(),
});
export type RunEntropiesExport = z.infer<typeof runEntropiesExportSchema>;

/** The spectrum as `spectrum.json` gives it. */
export const runSpectrumExportSchema = z.object({
  eigenvalues: z.array(z.number()),
  continuum: z.array(z.number()).nullable(),
  cutoff: z.number(),
  modesKept: z.number().int(),
  N: z.number().int(),
  /** present when the run asked for Rényi orders, a pair or the complement check */
  entropies: runEntropiesExportSchema.optional(),
});
export type RunSpectrumExport = z.infer<typeof runSpectrumExportSchema>;

/**
 * `run.json`: one run with everything a reader needs to trust and reuse its numbers — settings,
 * diagnostics, the spectrum, the subregion's generalised eigenvalues μ (W v = μ iΔ v restricted to the
 * subregion, server/engine/README.md §9), every entropy and the provenance.
 */
export const runJsonExportSchema = z.object({
  format: z.literal('tacet-run/1'),
  exportedAt: z.string(),
  run: z.object({
    id: z.string(),
    title: z.string().nullable(),
    status: z.string(),
    author: z.string(),
    parentRunId: z.string().nullable(),
    createdAt: z.string(),
    startedAt: z.string().nullable(),
    finishedAt: z.string().nullable(),
  }),
  /** the validated request the run was made from, as stored */
  request: z.unknown(),
  settings: z.object({
    dimension: z.union([z.literal(2), z.literal(4)]),
    regionKind: z.string(),
    region: z.unknown().nullable(),
    causalSet: z.object({ id: z.string(), name: z.string() }).nullable(),
    seed: z.string().nullable(),
    prng: z.string().nullable(),
    process: z.string().nullable(),
    mass: z.number(),
    truncation: z.string(),
    entropyRule: z.string(),
    restrictedCut: z.string().nullable(),
    engineRequest: z.string(),
  }),
  provenance: z.object({
    tacetVersion: z.string(),
    engineVersion: z.string(),
    backend: z.string(),
    engine: z.string(),
    engineReason: z.string().nullable(),
    timings: z.record(z.string(), z.number()),
  }),
  causalSet: z.object({ N: z.number().int(), density: z.number().nullable(), volume: z.number().nullable(), relations: z.number().int(), links: z.number().int().nullable() }),
  spectrum: runSpectrumExportSchema.omit({ entropies: true }).extend({ knee: z.unknown().nullable() }),
  diagnostics: z.record(z.string(), z.unknown()),
  cautions: z.array(z.string()),
  /** the subregion's entropy and its generalised eigenvalues μ, descending; null without a subregion */
  subregion: z
    .object({ S: z.number(), n: z.number().int(), modesKept: z.number().int(), cutoff: z.number().nullable(), restrictedCut: z.string().nullable(), renyi: z.record(z.string(), z.number()).nullable(), generalizedEigenvalues: z.array(z.number()) })
    .nullable(),
  entropies: runEntropiesExportSchema.nullable(),
});
export type RunJsonExport = z.infer<typeof runJsonExportSchema>;

export interface RunExportRow extends ExportFormatRow {
  /** the route's summary in the OpenAPI description */
  summary: string;
  /** the answer's shape, for a JSON format */
  schema?: z.ZodType;
}

export const runExports = {
  'points.csv': {
    label: 'Points (CSV)',
    note: 't,x[,y,z] per element, 17 significant digits',
    contentType: 'text/csv; charset=utf-8',
    nameSuffix: '-points',
    extension: 'csv',
    summary: 'Elements as CSV (t,x or t,x,y,z)',
  },
  'spectrum.csv': {
    label: 'Spectrum (CSV)',
    note: 'rank, eigenvalue, continuum, kept',
    contentType: 'text/csv; charset=utf-8',
    nameSuffix: '-spectrum',
    extension: 'csv',
    summary: 'Spectrum as CSV: rank,eigenvalue,continuum,kept',
  },
  'spectrum.json': {
    label: 'Spectrum (JSON)',
    note: 'eigenvalues, continuum, cut, modes kept, N; S_α, I(A:B) and the complement check when asked',
    contentType: 'application/json; charset=utf-8',
    nameSuffix: '-spectrum',
    extension: 'json',
    summary: 'Spectrum with cut and continuum',
    schema: runSpectrumExportSchema,
  },
  'entropy.csv': {
    label: 'Entropies (CSV)',
    note: 'quantity, part, α, n, value, modes kept, cut: S, S_α, the pair and the complement, 17 significant digits',
    contentType: 'text/csv; charset=utf-8',
    nameSuffix: '-entropies',
    extension: 'csv',
    summary: 'Entropies as CSV: quantity,part,alpha,n,value,modes_kept,cutoff,restricted_cut',
  },
  'generalized.csv': {
    label: 'Generalised eigenvalues (CSV)',
    note: 'rank, μ of the subregion (W v = μ iΔ v), 17 significant digits',
    contentType: 'text/csv; charset=utf-8',
    nameSuffix: '-generalized-eigenvalues',
    extension: 'csv',
    summary: "The subregion's generalised eigenvalues μ as CSV: rank,mu",
  },
  'run.json': {
    label: 'Run with provenance (JSON)',
    note: 'settings, diagnostics, spectrum, μ, entropies, engine version, backend, seed, times',
    contentType: 'application/json; charset=utf-8',
    nameSuffix: '',
    extension: 'json',
    summary: 'The whole run with its provenance',
    schema: runJsonExportSchema,
  },
  'numbers.tex': {
    label: 'Numbers (LaTeX)',
    note: 'booktabs table of N, ρ, the cut, n, S, S_α and I(A:B) by the precision rule',
    contentType: 'text/x-tex; charset=utf-8',
    nameSuffix: '-numbers',
    extension: 'tex',
    summary: "The run's numbers as a LaTeX table",
  },
} as const satisfies Record<RunExportFormat, RunExportRow>;

/** A study's exports, in the order of the study page's buttons; `/api/studies/:id/export?format=<format>`. */
export const studyExportFormats = ['csv', 'aggregates-csv', 'latex', 'json', 'methods', 'bibtex'] as const;
export type StudyExportFormat = (typeof studyExportFormats)[number];
export const studyExportQuerySchema = z.strictObject({ format: z.enum(studyExportFormats) });

export const studyExports = {
  csv: {
    label: 'Entropies (CSV)',
    note: 'tidy: one row per N, seed, subregion and rule, 17 significant digits',
    contentType: 'text/csv; charset=utf-8',
    nameSuffix: '-entropies',
    extension: 'csv',
  },
  'aggregates-csv': {
    label: 'Aggregates (CSV)',
    note: 'mean n, mean S, deviation, standard error, seeds',
    contentType: 'text/csv; charset=utf-8',
    nameSuffix: '-aggregates',
    extension: 'csv',
  },
  latex: {
    label: 'Table (LaTeX)',
    note: 'booktabs, ⟨S⟩ ± SE per rule, fits, a caption with the parameters',
    contentType: 'text/x-tex; charset=utf-8',
    nameSuffix: '-table',
    extension: 'tex',
  },
  json: {
    label: 'Provenance (JSON)',
    note: 'request, seeds, rules, engine version, backend, times, every number',
    contentType: 'application/json; charset=utf-8',
    nameSuffix: '',
    extension: 'json',
  },
  methods: {
    label: 'Methods paragraph (text)',
    note: 'what was computed, with citations and cautions',
    contentType: 'text/plain; charset=utf-8',
    nameSuffix: '-methods',
    extension: 'txt',
  },
  bibtex: {
    label: 'References (BibTeX)',
    note: 'the published methods used',
    contentType: 'text/x-bibtex; charset=utf-8',
    nameSuffix: '-references',
    extension: 'bib',
  },
} as const satisfies Record<StudyExportFormat, ExportFormatRow>;

/** What is exported: a run or a study. */
export type ExportKind = 'run' | 'study';
export type ExportFormatOf<K extends ExportKind> = K extends 'run' ? RunExportFormat : StudyExportFormat;

/** Both tables by kind, each with its formats in display order. */
export const exportTables: { [K in ExportKind]: { formats: readonly ExportFormatOf<K>[]; rows: Record<ExportFormatOf<K>, ExportFormatRow> } } = {
  run: { formats: runExportFormats, rows: runExports },
  study: { formats: studyExportFormats, rows: studyExports },
};

/** The attachment's name, e.g. `tacet-run-2a2f7d25-points.csv`, `tacet-study-0123abcd.json`. */
export function exportFileName<K extends ExportKind>(kind: K, id: string, format: ExportFormatOf<K>): string {
  const row = exportTables[kind].rows[format];
  return `tacet-${kind}-${id.slice(0, 8)}${row.nameSuffix}.${row.extension}`;
}

/** The URL the API serves the export at. */
export function exportUrl<K extends ExportKind>(kind: K, id: string, format: ExportFormatOf<K>): string {
  return kind === 'run'
    ? `/api/runs/${encodeURIComponent(id)}/${format}`
    : `/api/studies/${encodeURIComponent(id)}/export?format=${format}`;
}
