import { regionDescriptors, type RegionKind } from '@shared/regions';
import type { RunDetail, RunResult } from '@shared/runs';
import { plotPalette } from '../../../lib/plotTheme';
import { ErrorState, Loading } from '../../../ui/States';
import { useRunPoints } from '../api/runs';
import { logDecadeStep, pointsTraces, renyiTraces, spectrumTraces, tickFont } from '../lib/plotData';
import { PlotFigure } from '../../../ui/PlotFigure';

const axisTitle = (text: string) => ({ text, font: { size: 12 } });

export function SpectrumPlot({ run, result }: { run: RunDetail; result: RunResult }) {
  return (
    <PlotFigure
      title="Spectrum"
      fileName={`tacet-run-${run.id.slice(0, 8)}-spectrum`}
      data={spectrumTraces(result, plotPalette)}
      layout={{
        xaxis: { type: 'log', dtick: 1, title: axisTitle('rank k'), tickfont: tickFont, gridcolor: plotPalette.grid, linecolor: plotPalette.grid },
        yaxis: { type: 'log', dtick: logDecadeStep([...result.eigenvalues, ...(result.continuum ?? []), result.cutoff]), title: axisTitle('λ_k  (positive eigenvalues of iΔ)'), tickfont: tickFont, gridcolor: plotPalette.grid, exponentformat: 'power' },
        legend: { x: 1, xanchor: 'right', y: 1, bgcolor: 'rgba(247,244,238,0.85)' },
      }}
      caption={
        <>
          {result.eigenvalues.length} positive eigenvalues by rank, log–log; the cut keeps {result.modesKept}.
          {result.continuum ? ' Continuum curve: N/(4x_k) for the 2D diamond.' : ' No continuum curve for this region.'}
          {result.knee
            ? ' Knee (dotted): the first rank where the spectrum leaves the power law fitted to its top by more than the tolerance' +
              (result.knee.rankRange ? '; the shaded band is where it moves when the tolerance is halved or raised by half.' : '.')
            : ''}
        </>
      }
    />
  );
}

export function PointsPlot({ run }: { run: RunDetail }) {
  const points = useRunPoints(run.id, run.status === 'done');
  if (points.isPending) return <Loading label="Loading the points" />;
  if (points.isError) return <ErrorState error={points.error} onRetry={() => points.refetch()} />;
  const projected = points.data.dimension === 4;
  // a curved region is drawn in its conformal coordinates (T, θ or η, x), where light rays run at 45°
  const region = (run.request as { sprinkling?: { region?: { kind?: string } } } | null)?.sprinkling?.region?.kind;
  const conformal = region && region in regionDescriptors ? regionDescriptors[region as RegionKind].conformal : undefined;
  return (
    <PlotFigure
      title="Points"
      fileName={`tacet-run-${run.id.slice(0, 8)}-points`}
      height={460}
      data={pointsTraces(points.data, run.request, plotPalette)}
      layout={{
        xaxis: { title: axisTitle(conformal?.x ?? 'x'), tickfont: tickFont, gridcolor: plotPalette.grid, zeroline: false, constrain: 'domain' },
        yaxis: { title: axisTitle(conformal?.t ?? 't'), tickfont: tickFont, gridcolor: plotPalette.grid, zeroline: false, scaleanchor: 'x', scaleratio: 1 },
        legend: { orientation: 'h', y: -0.14 },
      }}
      caption={
        <>
          The sprinkled elements in ({projected ? 't, x — a projection of the 4D points' : 't, x'}), t upwards, light rays at
          45°{points.data.subregionElements ? '; the subregion’s elements ringed in the accent colour' : ''}
          {points.data.pairElements ? '; A and B of the mutual information as open squares and triangles, their diamonds dotted' : ''}.
        </>
      }
    />
  );
}

/** S_α of the subregion against α, with S at α = 1 and S_∞ as a dashed line (plotData.ts renyiTraces). */
export function RenyiPlot({ run, entropy }: { run: RunDetail; entropy: NonNullable<RunResult['entropy']> }) {
  return (
    <PlotFigure
      title="Rényi entropies"
      fileName={`tacet-run-${run.id.slice(0, 8)}-renyi`}
      height={320}
      data={renyiTraces(entropy, plotPalette)}
      layout={{
        xaxis: { title: axisTitle('order α'), tickfont: tickFont, gridcolor: plotPalette.grid, zeroline: false, rangemode: 'tozero' },
        yaxis: { title: axisTitle('S_α of the subregion'), tickfont: tickFont, gridcolor: plotPalette.grid, zeroline: false },
        legend: { orientation: 'h', y: -0.25 },
      }}
      caption={
        <>
          S_α = Σ ln(μ^α − (μ−1)^α)/(α − 1) over the generalised eigenvalues μ &gt; 1 of the restricted state, non-increasing in α; the
          diamond at α = 1 is the von Neumann S.{entropy.renyi && 'inf' in entropy.renyi ? ' The dashed line is the min-entropy S_∞ = Σ ln μ, the limit α → ∞.' : ''}
        </>
      }
    />
  );
}
