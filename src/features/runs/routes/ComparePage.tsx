import { useState } from 'react';
import { Link, useSearchParams } from 'react-router';
import { plotPalette } from '../../../lib/plotTheme';
import { PageHeader, Section } from '../../../ui/Page';
import { Empty, ErrorState, Loading } from '../../../ui/States';
import { useRunDetails } from '../api/runs';
import { Caution } from '../../../ui/Caution';
import { Checkbox } from '../../../ui/Checkbox';
import { Figure } from '../../../ui/Figure';
import { PlotFigure } from '../../../ui/PlotFigure';
import { StatusLabel } from '../../../ui/StatusLabel';
import { Button } from '../../../ui/Button';
import { CompareDownloads } from '../components/CompareDownloads';
import { CompareEntropy } from '../components/CompareEntropy';
import { CompareSettings } from '../components/CompareSettings';
import { compareSearch, compareSelection } from '../lib/compareRuns';
import { compareTraces, logDecadeStep, tickFont, type CompareRun } from '../lib/plotData';
import { maxCompared, runLabel } from '../lib/runIds';

/**
 * Runs side by side by spectrum and by entropy, with the settings that differ and the compared data as
 * files. The selection lives in the URL (`?ids=a,b`), so a reload or a shared link shows the same runs.
 */
export function ComparePage() {
  const [params, setParams] = useSearchParams();
  const ids = compareSelection(params);
  const details = useRunDetails(ids);
  const [normalised, setNormalised] = useState(true);
  const leaveOut = (id: string) => setParams(new URLSearchParams(compareSearch(ids.filter((other) => other !== id))));

  if (ids.length < 2) {
    return (
      <>
        <PageHeader title="Compare runs" />
        <Empty>
          Pick 2 to {maxCompared} finished runs with the boxes in the{' '}
          <Link to="/runs" className="text-accent hover:underline">
            runs table
          </Link>{' '}
          and press Compare{ids.length === 1 ? '; one run is left in this selection' : ''}.
        </Empty>
      </>
    );
  }
  if (details.some((d) => d.isPending)) return <Loading label="Loading the runs" />;
  const failed = details.find((d) => d.isError);
  if (failed) return <ErrorState error={failed.error} onRetry={() => failed.refetch()} />;

  const runs = details.map((d) => d.data!);
  const withResult = runs.filter((run) => run.result !== null);
  const compared: CompareRun[] = withResult.map((run) => ({
    id: run.id,
    label: runLabel(run),
    N: run.result!.N,
    eigenvalues: run.result!.eigenvalues,
    continuum: run.result!.continuum,
    cutoff: run.result!.cutoff,
  }));

  return (
    <>
      <PageHeader
        title="Compare runs"
        context={`${compared.length} runs by spectrum and entropy${compared.length < runs.length ? `; ${runs.length - compared.length} without results left out` : ''}.`}
      />
      <div className="mb-10">
        <Caution />
      </div>
      <Section title="Spectra" aside={<Checkbox label="Normalise λ/N" checked={normalised} onChange={setNormalised} />}>
        {compared.length === 0 ? (
          <Empty>None of these runs has finished yet.</Empty>
        ) : (
          <PlotFigure
            title="Compared spectra"
            fileName={`tacet-compare-${compared.map((r) => r.id.slice(0, 4)).join('-')}`}
            height={480}
            data={compareTraces(compared, normalised, plotPalette)}
            layout={{
              xaxis: { type: 'log', dtick: 1, title: { text: 'rank k' }, tickfont: tickFont, gridcolor: plotPalette.grid },
              yaxis: {
                type: 'log',
                dtick: logDecadeStep(compared.flatMap((r) => r.eigenvalues.map((v) => (normalised ? v / r.N : v)))),
                title: { text: normalised ? 'λ_k / N' : 'λ_k' },
                tickfont: tickFont,
                gridcolor: plotPalette.grid,
                exponentformat: 'power',
              },
              // below the plot, as the studies' plots: inside it the legend covered the largest eigenvalues
              legend: { orientation: 'h', x: 0, y: -0.18, yanchor: 'top', bgcolor: 'rgba(0,0,0,0)' },
            }}
            caption={
              normalised
                ? 'Positive eigenvalues of iΔ divided by N, by rank; for 2D diamonds the continuum 1/(4x_k) is the same for every N.'
                : 'Positive eigenvalues of iΔ by rank; each 2D diamond has its own continuum N/(4x_k).'
            }
          />
        )}
      </Section>
      <Section title="Entropy">
        <CompareEntropy runs={withResult} />
      </Section>
      <Section title="Settings that differ">
        <CompareSettings runs={runs} />
      </Section>
      <Section title="Downloads">
        <CompareDownloads runs={withResult} />
      </Section>
      <Section title="Runs">
        {/* relative: the screen-reader header of the last column is positioned, and must scroll with the table instead of widening the page */}
        <div className="relative overflow-x-auto">
          <table className="w-full border-collapse text-sm" aria-label="Compared runs">
          <thead>
            <tr className="border-b border-ink/70 text-left text-xs text-ink-faint">
              <th className="py-2 pr-4 font-normal">Run</th>
              <th className="py-2 pr-4 font-normal">Status</th>
              <th className="py-2 pr-4 text-right font-normal">N</th>
              <th className="py-2 pr-4 text-right font-normal">Cut λc</th>
              <th className="py-2 pr-4 text-right font-normal">Modes kept</th>
              <th className="py-2 pr-4 text-right font-normal">S</th>
              <th className="py-2 font-normal">
                <span className="sr-only">Leave out</span>
              </th>
            </tr>
          </thead>
          <tbody>
            {runs.map((run) => (
              <tr key={run.id} className="border-b border-rule align-baseline">
                <td className="py-2 pr-4">
                  <Link to={`/runs/${run.id}`} className="hover:text-accent hover:underline">
                    {runLabel(run)}
                  </Link>
                </td>
                <td className="py-2 pr-4">
                  <StatusLabel status={run.status} percent={run.percent} />
                </td>
                <td className="py-2 pr-4 text-right">
                  <span className="figures">{run.result?.N ?? run.N ?? '—'}</span>
                </td>
                <td className="py-2 pr-4 text-right">
                  <Figure value={run.result?.cutoff} whole={3} kind="cut" />
                </td>
                <td className="py-2 pr-4 text-right">
                  <span className="figures">{run.result?.modesKept ?? '—'}</span>
                </td>
                <td className="py-2 pr-4 text-right">
                  <Figure value={run.result?.entropy?.S} whole={3} fraction={7} kind="entropy" />
                </td>
                <td className="py-2 text-right">
                  <Button variant="quiet" className="text-xs" onClick={() => leaveOut(run.id)} aria-label={`Leave ${runLabel(run)} out of the comparison`}>
                    Leave out
                  </Button>
                </td>
              </tr>
            ))}
          </tbody>
        </table>
          </div>
      </Section>
    </>
  );
}
