import type { StudyExportFormat } from '@shared/exports';
import { studyRenyiKeys } from '@shared/studies';
import type { StudyExportInput } from './common';
import { aggregatesCsv, tidyCsv } from './csv';
import { latexTable } from './latex';
import { methodsParagraph } from './methods';
import { provenanceJson } from './provenance';
import { bibtex } from './references';

export { escapeLatex, formatWithUncertainty, studyCautions, studyDimension, type StudyExportInput } from './common';
export { aggregatesCsv, csvField, tidyCsv } from './csv';
export { latexTable } from './latex';
export { methodsParagraph } from './methods';
export { provenanceJson } from './provenance';
export { bibtex, referencesUsed } from './references';

/** One renderer per format of shared/exports.ts `studyExports`. */
export const studyRenderers: Record<StudyExportFormat, (input: StudyExportInput) => string> = {
  csv: (input) => tidyCsv(input.entropies, input.request.rules, studyRenyiKeys(input.request)),
  'aggregates-csv': (input) => aggregatesCsv(input.aggregates, input.request.rules, studyRenyiKeys(input.request)),
  latex: (input) => latexTable(input),
  json: (input) => JSON.stringify(provenanceJson(input), null, 2) + '\n',
  methods: (input) => methodsParagraph(input),
  bibtex: (input) => bibtex(input.request),
};
