import type { RunDetail } from '@shared/runs';
import { differingSettings, distinctLabels } from '../lib/compareRuns';

/** The settings in which the compared runs differ, one row each, one column per run; a sentence when they all agree. */
export function CompareSettings({ runs }: { runs: RunDetail[] }) {
  const rows = differingSettings(runs);
  const labels = distinctLabels(runs);
  if (rows.length === 0) {
    return (
      <p className="text-sm text-ink-soft" data-testid="settings-agree">
        All compared runs agree in cut rule, restricted cut, seed, mass, engine, N, region and subregion.
      </p>
    );
  }
  return (
    <div className="overflow-x-auto">
      <table className="w-full border-collapse text-sm" aria-label="Settings that differ">
        <thead>
          <tr className="border-b border-ink/70 text-left text-xs text-ink-faint">
            <th scope="col" className="py-2 pr-4 font-normal">
              Setting
            </th>
            {labels.map((label, k) => (
              <th key={runs[k]!.id} scope="col" className="py-2 pr-4 font-normal">
                {label}
              </th>
            ))}
          </tr>
        </thead>
        <tbody>
          {rows.map((row) => (
            <tr key={row.key} className="border-b border-rule align-baseline" data-testid={`differs-${row.key}`}>
              <th scope="row" className="py-1.5 pr-4 text-left font-normal text-ink-soft">
                {row.label}
              </th>
              {row.values.map((value, k) => (
                <td key={runs[k]!.id} className="figures py-1.5 pr-4 text-ink">
                  {value}
                </td>
              ))}
            </tr>
          ))}
        </tbody>
      </table>
      <p className="mt-2 text-xs text-ink-faint">Only the settings that differ are listed; the rest agree across all compared runs.</p>
    </div>
  );
}
