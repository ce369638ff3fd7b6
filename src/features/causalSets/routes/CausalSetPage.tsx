import { useState } from 'react';
import { Link, useNavigate, useParams } from 'react-router';
import type { CausalSetDetail } from '@shared/causalSets';
import { isApiError } from '../../../lib/apiClient';
import { formatDateTime } from '../../../lib/format';
import { plotPalette } from '../../../lib/plotTheme';
import { Button } from '../../../ui/Button';
import { RuleCautions } from '../../../ui/Caution';
import { ManifoldLikenessPanel } from '../../../ui/ManifoldLikenessPanel';
import { FormError } from '../../../ui/Field';
import { PageHeader, Section } from '../../../ui/Page';
import { Empty, ErrorState, Loading } from '../../../ui/States';
import { useCan } from '../../../lib/permissions';
import { PlotFigure } from '../../../ui/PlotFigure';
import { downloadOriginalFile, useCausalSet, useDeleteCausalSet } from '../api/causalSets';
import { CausalSetStats } from '../components/CausalSetStats';
import { kindLabels } from './CausalSetsPage';

/** Elements in the (x, t) plane — in 4D against the radius |x⃗| — with equal scales, so light rays run at 45°. */
function PointsFigure({ set }: { set: CausalSetDetail & { preview: { kind: 'coordinates' } } }) {
  const { points } = set.preview;
  const fourD = set.dimension === 4;
  const x = points.map((p) => (fourD ? Math.hypot(p[1], p[2], p[3]) : p[1]));
  const t = points.map((p) => p[0]);
  return (
    <PlotFigure
      title="Elements"
      fileName={`tacet-causal-set-${set.id.slice(0, 8)}-points`}
      height={460}
      data={[
        {
          // SVG markers, not WebGL: a browser without WebGL (headless, remote desktops) would show an error box instead
          type: 'scatter',
          mode: 'markers',
          name: 'elements',
          x,
          y: t,
          marker: { color: plotPalette.data, size: set.N > 1500 ? 3 : 4.5, opacity: 0.85 },
          hovertemplate: fourD ? 'r = %{x:.6g}<br>t = %{y:.6g}<extra></extra>' : 'x = %{x:.6g}<br>t = %{y:.6g}<extra></extra>',
        },
      ]}
      layout={{
        showlegend: false,
        xaxis: { title: { text: fourD ? 'r = |x⃗|' : 'x' }, scaleanchor: 'y', scaleratio: 1, gridcolor: plotPalette.grid, zerolinecolor: plotPalette.grid },
        yaxis: { title: { text: 't' }, gridcolor: plotPalette.grid, zerolinecolor: plotPalette.grid },
      }}
      caption={fourD ? 'Radius against time; each element once.' : 'Each element at its (x, t); equal scales, so light rays run at 45°.'}
    />
  );
}

/** Elements per layer of the order (layer k: the longest chain from below ending there has k elements). */
function LayersFigure({ set }: { set: CausalSetDetail & { preview: { kind: 'relations' } } }) {
  const sizes = set.preview.layerSizes;
  return (
    <PlotFigure
      title="Layers"
      fileName={`tacet-causal-set-${set.id.slice(0, 8)}-layers`}
      height={360}
      data={[
        {
          type: 'bar',
          name: 'elements per layer',
          x: sizes.map((_, k) => k + 1),
          y: sizes,
          marker: { color: plotPalette.data },
          hovertemplate: 'layer %{x}: %{y} elements<extra></extra>',
        },
      ]}
      layout={{
        showlegend: false,
        bargap: 0.15,
        // whole numbers on both axes: one tick per layer while they fit, counts without fractions
        xaxis: { title: { text: 'layer (longest chain from below)' }, tickformat: 'd', ...(sizes.length <= 40 ? { dtick: 1 } : {}) },
        yaxis: { title: { text: 'elements' }, tickformat: 'd', rangemode: 'tozero', ...(Math.max(...sizes) <= 10 ? { dtick: 1 } : {}) },
      }}
      caption={`Height ${set.stats.height}: the number of layers.`}
    />
  );
}

export function CausalSetPage() {
  const { causalSetId = '' } = useParams();
  const set = useCausalSet(causalSetId);
  const canCompute = useCan('compute');
  const remove = useDeleteCausalSet();
  const navigate = useNavigate();
  const [actionError, setActionError] = useState<string | null>(null);

  if (set.isPending) return <Loading label="Loading the causal set" />;
  if (set.isError) {
    return isApiError(set.error, 404) ? (
      <Empty>
        This causal set does not exist in this team.{' '}
        <Link to="/causal-sets" className="text-accent hover:underline">
          All causal sets
        </Link>
      </Empty>
    ) : (
      <ErrorState error={set.error} onRetry={() => set.refetch()} />
    );
  }
  const data = set.data;

  async function download() {
    setActionError(null);
    try {
      await downloadOriginalFile(data.id, data.fileName);
    } catch (error) {
      setActionError(error instanceof Error ? error.message : 'The download failed.');
    }
  }

  async function destroy() {
    if (!window.confirm(`Delete the causal set "${data.name}"? Runs made on it keep their own copy of the elements.`)) return;
    setActionError(null);
    try {
      await remove.mutateAsync(data.id);
      navigate('/causal-sets');
    } catch (error) {
      setActionError(error instanceof Error ? error.message : 'The causal set could not be deleted.');
    }
  }

  return (
    <>
      <PageHeader
        title={data.name}
        context={
          <>
            {kindLabels[data.kind]}, {data.dimension}D, <span className="figures">N = {data.N}</span> · imported by {data.createdBy.name} on{' '}
            <span className="figures">{formatDateTime(data.createdAt)}</span>
          </>
        }
        actions={
          <>
            <Button variant="quiet" onClick={download}>
              Download the original file
            </Button>
            {canCompute && (
              <Button variant="danger" onClick={destroy} busy={remove.isPending}>
                Delete
              </Button>
            )}
          </>
        }
      />
      <FormError message={actionError} />
      <RuleCautions cautions={data.warnings} />
      <div className="grid grid-cols-1 gap-x-12 lg:grid-cols-[minmax(0,1fr)_24rem]">
        <Section title={data.preview.kind === 'coordinates' ? 'Elements' : 'Layers'}>
          {data.preview.kind === 'coordinates' ? (
            <PointsFigure set={data as CausalSetDetail & { preview: { kind: 'coordinates' } }} />
          ) : (
            <LayersFigure set={data as CausalSetDetail & { preview: { kind: 'relations' } }} />
          )}
        </Section>
        <div>
          <Section title="Summary">
            <CausalSetStats set={data} />
          </Section>
          {data.stats.manifold && (
            <Section title="Manifold-likeness">
              <ManifoldLikenessPanel
                report={data.stats.manifold}
                declaredDimension={data.dimension}
                expectedElements={data.density !== null && data.volume !== null ? data.density * data.volume : null}
              />
            </Section>
          )}
        </div>
      </div>
      {canCompute && (
        <Section title="Run the vacuum on it">
          <div className="flex max-w-3xl flex-col items-start gap-3">
            <p className="text-sm text-ink-soft">
              The new-run form with this set picked: the same settings as every run (cut rule, mass, engine, a subregion
              by its tips{data.kind === 'relations' ? ' — here by its element labels, since a relation list has no coordinates' : ''} or
              element labels, a pair, Rényi orders, the complement check), with double truncation on.
            </p>
            <Link to={`/runs/new?causalSet=${encodeURIComponent(data.id)}`} className="rounded-sm bg-accent px-4 py-1.5 text-sm font-medium text-paper hover:bg-accent-deep" data-testid="run-on-causal-set">
              Start a run on this set
            </Link>
          </div>
        </Section>
      )}
    </>
  );
}
