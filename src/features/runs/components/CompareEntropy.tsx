import type { RunDetail } from '@shared/runs';
import { renyiLabel } from '@shared/vacuum';
import { plotPalette } from '../../../lib/plotTheme';
import { PlotFigure } from '../../../ui/PlotFigure';
import { Empty } from '../../../ui/States';
import { compareFileStem, entropyCell, entropyCompareTraces, entropyRows, renyiKeysOf } from '../lib/compareRuns';
import { tickFont } from '../lib/plotData';

/** The compared runs by entropy: a table of n, S, S_α, I(A:B) and S_O′ per run, and the same values as a plot. */
export function CompareEntropy({ runs }: { runs: RunDetail[] }) {
  const rows = entropyRows(runs);
  const orders = renyiKeysOf(rows);
  const withPair = rows.some((r) => r.I !== null);
  const withComplement = rows.some((r) => r.SOprime !== null);
  const anyEntropy = rows.some((r) => r.S !== null || r.I !== null);
  const traces = entropyCompareTraces(rows, plotPalette);
  const categories = new Set(traces.flatMap((t) => t.x)).size;
  return (
    <div className="flex flex-col gap-6">
      <div className="overflow-x-auto">
        <table className="w-full border-collapse text-sm" aria-label="Compared entropies">
          <thead>
            <tr className="border-b border-ink/70 text-left text-xs text-ink-faint">
              <th className="py-2 pr-4 font-normal">Run</th>
              <th className="py-2 pr-4 font-normal">Rule</th>
              <th className="py-2 pr-4 font-normal">Subregion</th>
              <th className="py-2 pr-4 text-right font-normal">n</th>
              <th className="py-2 pr-4 text-right font-normal">S</th>
              {orders.map((key) => (
                <th key={key} className="py-2 pr-4 text-right font-normal">
                  {renyiLabel(key)}
                </th>
              ))}
              {withPair && <th className="py-2 pr-4 text-right font-normal">I(A:B)</th>}
              {withComplement && <th className="py-2 text-right font-normal">S_O′</th>}
            </tr>
          </thead>
          <tbody>
            {rows.map((row) => (
              <tr key={row.id} className="border-b border-rule align-baseline" data-testid={`entropy-${row.id}`}>
                <td className="py-2 pr-4">{row.label}</td>
                <td className="py-2 pr-4 text-ink-soft">{row.rule}</td>
                <td className="figures py-2 pr-4 text-ink-soft">{row.subregion}</td>
                <td className="figures py-2 pr-4 text-right">{row.n ?? '—'}</td>
                <td className="figures py-2 pr-4 text-right">{entropyCell(row.S)}</td>
                {orders.map((key) => (
                  <td key={key} className="figures py-2 pr-4 text-right">
                    {entropyCell(row.renyi[key])}
                  </td>
                ))}
                {withPair && <td className="figures py-2 pr-4 text-right">{entropyCell(row.I)}</td>}
                {withComplement && <td className="figures py-2 text-right">{entropyCell(row.SOprime)}</td>}
              </tr>
            ))}
          </tbody>
        </table>
      </div>
      {anyEntropy ? (
        <PlotFigure
          title="Compared entropies"
          fileName={`${compareFileStem(runs)}-entropy`}
          height={360}
          data={traces}
          layout={{
            // half a category of room on each side, so the first and last run's points sit clear of the axes
            xaxis: { type: 'category', title: { text: 'run' }, tickfont: tickFont, automargin: true, range: [-0.5, categories - 0.5] },
            yaxis: { title: { text: 'entropy' }, tickfont: tickFont, gridcolor: plotPalette.grid, rangemode: 'tozero' },
            legend: { orientation: 'h', x: 0, y: -0.3, yanchor: 'top', bgcolor: 'rgba(0,0,0,0)' },
          }}
          caption="Each run's subregion entropy S, its Rényi S_α, the pair's I(A:B) and the complement's S_O′, where the run asked for them; single sprinklings, so no error bars."
        />
      ) : (
        <Empty>None of these runs asked for a subregion or a pair; re-analyse one with a subregion to compare entropies.</Empty>
      )}
    </div>
  );
}
