import { useState, type ReactNode } from 'react';
import { exportFileName, exportTables, exportUrl, type ExportFormatOf, type ExportKind } from '@shared/exports';
import { api } from '../lib/apiClient';
import { Button } from './Button';

/**
 * One download button per export of a run or a study, straight from the table in shared/exports.ts
 * that the API serves, so a format added there appears here too.
 */
export function ExportDownloads<K extends ExportKind>({
  kind,
  id,
  disabled = false,
  testId,
  children,
}: {
  kind: K;
  id: string;
  disabled?: boolean;
  testId?: string;
  /** the note under the list */
  children?: ReactNode;
}) {
  const [busy, setBusy] = useState<string | null>(null);
  const [error, setError] = useState<string | null>(null);
  const { formats, rows } = exportTables[kind];

  async function get(format: ExportFormatOf<K>) {
    setError(null);
    setBusy(format);
    try {
      await api.download(exportUrl(kind, id, format), exportFileName(kind, id, format));
    } catch (cause) {
      setError(cause instanceof Error ? cause.message : String(cause));
    } finally {
      setBusy(null);
    }
  }

  return (
    <div className="flex flex-col gap-2" data-testid={testId}>
      <ul className="flex flex-col text-sm">
        {formats.map((format) => (
          <li key={format} className="flex items-baseline gap-4 border-b border-rule py-1.5">
            <Button variant="quiet" busy={busy === format} disabled={disabled} onClick={() => get(format)}>
              {rows[format].label}
            </Button>
            <span className="text-xs text-ink-faint">{rows[format].note}</span>
          </li>
        ))}
      </ul>
      {children && <p className="text-xs text-ink-faint">{children}</p>}
      {error && (
        <p role="alert" className="text-xs text-danger">
          {error}
        </p>
      )}
    </div>
  );
}
