import { exportFileName, exportTables, type ExportFormatOf, type ExportKind } from '@shared/exports';

export { runRenderers, type RunExportSource } from './runs';
export { studyRenderers, type StudyExportInput } from './studies';

/** A rendered export as the API sends it: an attachment with its table row's type and name. */
export interface ExportFile {
  body: string;
  contentType: string;
  filename: string;
}

/** Wraps a rendered body with the content type and file name of its row in shared/exports.ts. */
export function exportFile<K extends ExportKind>(kind: K, id: string, format: ExportFormatOf<K>, body: string): ExportFile {
  return { body, contentType: exportTables[kind].rows[format].contentType, filename: exportFileName(kind, id, format) };
}
