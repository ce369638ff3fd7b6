import type { RunDetail } from '@shared/runs';
import { saveBlob } from '../../../lib/download';
import { Button } from '../../../ui/Button';
import { compareCsv, compareFileStem, compareJson } from '../lib/compareRuns';

/** The compared data as files, built in the browser from the same rows the page shows. */
export function CompareDownloads({ runs }: { runs: RunDetail[] }) {
  const stem = compareFileStem(runs);
  const files = [
    { label: 'Compared runs (CSV)', note: 'one row per run: settings, n, S, S_α, I(A:B), S_O′, 17 significant digits', name: `${stem}.csv`, type: 'text/csv', body: () => compareCsv(runs) },
    { label: 'Compared runs (JSON)', note: 'the settings table, the entropy rows and each spectrum with its cut', name: `${stem}.json`, type: 'application/json', body: () => compareJson(runs) },
  ];
  return (
    <ul className="flex flex-col text-sm" data-testid="compare-downloads">
      {files.map((file) => (
        <li key={file.name} className="flex items-baseline gap-4 border-b border-rule py-1.5">
          <Button variant="quiet" onClick={() => saveBlob(new Blob([file.body()], { type: `${file.type};charset=utf-8` }), file.name)}>
            {file.label}
          </Button>
          <span className="text-xs text-ink-faint">{file.note}</span>
        </li>
      ))}
    </ul>
  );
}
