import type { Response } from 'express';
import type { ExportFile } from '../exports/index';

/** Sends a rendered export as an attachment under its file name and content type. */
export function sendExportFile(res: Response, file: ExportFile): void {
  // attachment() guesses a type from the extension, so the table's one is set after it
  res.attachment(file.filename);
  res.set('Content-Type', file.contentType);
  res.send(file.body);
}
