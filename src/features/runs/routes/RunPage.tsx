import { useState } from 'react';
import { Link, useLocation, useNavigate, useParams } from 'react-router';
import { runOriginOf, runOriginText, type RunDetail } from '@shared/runs';
import { isApiError } from '../../../lib/apiClient';
import { formatDateTime } from '../../../lib/format';
import { Button } from '../../../ui/Button';
import { ExportDownloads } from '../../../ui/ExportDownloads';
import { ManifoldLikenessPanel } from '../../../ui/ManifoldLikenessPanel';
import { PageHeader, Section } from '../../../ui/Page';
import { regionSettingsText, regionSpecSchema } from '@shared/regions';
import { ErrorState, Loading } from '../../../ui/States';
import { useCan } from '../../../lib/permissions';
import { isActive, useCancelRun, useDeleteRun, useRun } from '../api/runs';
import { Caution, RuleCautions } from '../../../ui/Caution';
import { ReanalyseForm } from '../components/ReanalyseForm';
import { ComplementTable, DiagnosticsTable, EntropyTable, MutualInformationPanel, RenyiTable, SettingsTable, singleCutNote } from '../components/RunResultTables';
import { PointsPlot, RenyiPlot, SpectrumPlot } from '../components/RunPlots';
import { structuredSpectrumNote } from '../lib/engineText';
import { RunProgress } from '../components/RunProgress';
import { isReseededState, RunDailyLoopActions } from '../components/RunDailyLoopActions';
import { StatusLabel } from '../../../ui/StatusLabel';
import { runLabel } from '../lib/runIds';
import { RunLatexCopy } from '../components/RunLatexCopy';

export function RunPage() {
  const { runId = '' } = useParams();
  const run = useRun(runId);

  if (run.isPending) return <Loading label="Loading the run" />;
  if (run.isError) {
    if (isApiError(run.error, 404)) {
      return (
        <>
          <PageHeader title="Run not found" />
          <p className="text-sm text-ink-soft">
            No run with this id in the current team: it may have been deleted, or it belongs to another team.{' '}
            <Link to="/runs" className="text-accent hover:underline">
              All runs
            </Link>
          </p>
        </>
      );
    }
    return <ErrorState error={run.error} onRetry={() => run.refetch()} />;
  }
  return <RunView run={run.data} />;
}

/** The imported causal set a run was made on, by a link to it, with its region ("relation list, N elements" when it has none). */
function ImportedSetLink({ run }: { run: RunDetail }) {
  const set = (run.request as { causalSet?: { id: string; name: string; kind: 'coordinates' | 'relations'; N: number; region: unknown } } | null)?.causalSet;
  if (!set) return null;
  const region = regionSpecSchema.safeParse(set.region);
  const where = region.success ? regionSettingsText(region.data) : set.kind === 'relations' ? `relation list, ${set.N} elements` : `coordinates, ${set.N} elements, scaled by a density`;
  return (
    <>
      <span aria-hidden>·</span>
      <span>
        on imported set{' '}
        <Link to={`/causal-sets/${set.id}`} className="text-accent hover:underline">
          {set.name}
        </Link>{' '}
        ({where})
      </span>
    </>
  );
}

function RunView({ run }: { run: RunDetail }) {
  const canCompute = useCan('compute');
  const result = run.result;
  const doubleTruncation = Boolean((run.request as { doubleTruncation?: boolean } | null)?.doubleTruncation);
  const dimension = run.dimension;

  return (
    <>
      <PageHeader
        title={runLabel(run)}
        context={
          <span className="inline-flex flex-wrap items-baseline gap-x-2">
            <StatusLabel status={run.status} />
            <span aria-hidden>·</span>
            <span>{run.author.name}</span>
            <span aria-hidden>·</span>
            <span className="figures">{formatDateTime(run.createdAt)}</span>
            <ImportedSetLink run={run} />
            <StudyCellOrigin request={run.request} />
            {run.retryOfRunId && (
              <>
                <span aria-hidden>·</span>
                <span>
                  retry of{' '}
                  <Link to={`/runs/${run.retryOfRunId}`} className="text-accent hover:underline">
                    run {run.retryOfRunId.slice(0, 8)}
                  </Link>
                </span>
              </>
            )}
            {run.parentRunId && (
              <>
                <span aria-hidden>·</span>
                <span>
                  re-analysis of{' '}
                  <Link to={`/runs/${run.parentRunId}`} className="text-accent hover:underline">
                    run {run.parentRunId.slice(0, 8)}
                  </Link>
                </span>
              </>
            )}
          </span>
        }
        actions={canCompute && <RunActions run={run} />}
      />

      <ReseededNote run={run} />

      {isActive(run.status) && (
        <Section title="Progress">
          <RunProgress run={run} />
        </Section>
      )}

      {run.status === 'failed' && (
        <Section title="Failed">
          <p role="alert" className="border-l-2 border-danger pl-3 text-sm text-danger" data-testid="run-error">
            {run.error ?? 'The run failed without a message.'}
          </p>
        </Section>
      )}

      {run.status === 'cancelled' && (
        <p className="mb-10 text-sm text-ink-soft">This run was cancelled{run.stage ? ` during “${run.stage}”` : ''}; nothing was kept.</p>
      )}

      {result && (
        <>
          <div className="mb-10 flex flex-col gap-3">
            <Caution />
            <RuleCautions cautions={result.cautions ?? []} />
          </div>
          <Section title="Spectrum" aside={<span className="figures">N = {result.N}</span>}>
            {structuredSpectrumNote(result) && (
              <p className="mb-4 text-sm text-ink-soft" data-testid="structured-note">
                {structuredSpectrumNote(result)}
              </p>
            )}
            <SpectrumPlot run={run} result={result} />
          </Section>
          <Section title="Points">
            <PointsPlot run={run} />
          </Section>
          <div className="grid grid-cols-1 gap-x-12 md:grid-cols-2">
            {result.entropy ? (
              <Section title="Entropy">
                <EntropyTable
                  entropy={result.entropy}
                  doubleTruncation={doubleTruncation}
                  note={singleCutNote(result.entropy, result.modesKept, run.truncation !== 'none', doubleTruncation)}
                />
              </Section>
            ) : (
              <Section title="Entropy">
                <p className="text-sm text-ink-soft">No subregion was asked for this run{canCompute ? '; re-analyse with one below.' : '.'}</p>
              </Section>
            )}
            <Section title="Diagnostics">
              <DiagnosticsTable result={result} />
            </Section>
          </div>
          {result.entropy?.renyi && (
            <Section title="Rényi entropies">
              <div className="grid grid-cols-1 items-start gap-x-12 gap-y-6 lg:grid-cols-[minmax(16rem,22rem)_1fr]">
                <RenyiTable entropy={result.entropy} />
                <RenyiPlot run={run} entropy={result.entropy} />
              </div>
            </Section>
          )}
          {(result.mutualInformation || (result.complement && result.entropy)) && (
            <div className="grid grid-cols-1 gap-x-12 lg:grid-cols-2">
              {result.mutualInformation && (
                <Section title="Mutual information">
                  <MutualInformationPanel mutualInformation={result.mutualInformation} />
                </Section>
              )}
              {result.complement && result.entropy && (
                <Section title="Complement check">
                  <ComplementTable entropy={result.entropy} complement={result.complement} />
                </Section>
              )}
            </div>
          )}
          {result.manifold && (
            <Section title="Manifold-likeness" aside="what the order alone says about its dimension">
              <div className="max-w-2xl">
                <ManifoldLikenessPanel
                  report={result.manifold}
                  declaredDimension={run.dimension}
                  expectedElements={result.density !== null && result.volume !== null ? result.density * result.volume : null}
                />
              </div>
            </Section>
          )}
          <Section title="Downloads">
            <ExportDownloads kind="run" id={run.id}>
              Each plot has its own PNG and SVG download beneath it.
            </ExportDownloads>
            <RunLatexCopy run={run} />
          </Section>
        </>
      )}

      <Section title="Settings">
        <SettingsTable run={run} />
      </Section>

      {canCompute && result && run.status === 'done' && (
        <Section title="Re-analyse">
          <ReanalyseForm run={run} dimension={dimension} />
        </Section>
      )}
    </>
  );
}

/** On the run a "Same settings, new seed" started: which run it copies and the seed it drew. */
function ReseededNote({ run }: { run: RunDetail }) {
  const state: unknown = useLocation().state;
  if (!isReseededState(state)) return null;
  return (
    <p className="mb-8 border-l-2 border-accent pl-3 text-sm text-ink-soft" data-testid="reseeded-note">
      The settings of{' '}
      <Link to={`/runs/${state.reseededFrom}`} className="text-accent hover:underline">
        run {state.reseededFrom.slice(0, 8)}
      </Link>{' '}
      on a new sprinkling, seed <span className="font-mono text-ink">{state.seed}</span>
      {run.status === 'done' ? '.' : '; it is queued like any other run.'}
    </p>
  );
}

function RunActions({ run }: { run: RunDetail }) {
  const cancel = useCancelRun(run.id);
  const remove = useDeleteRun();
  const navigate = useNavigate();
  const [confirming, setConfirming] = useState(false);
  const error = cancel.error ?? remove.error;

  return (
    <div className="flex flex-col items-end gap-1">
      <div className="flex flex-wrap items-baseline justify-end gap-x-4 gap-y-2">
        <RunDailyLoopActions run={run} />
        {isActive(run.status) && (
          <Button variant="quiet" busy={cancel.isPending} disabled={run.cancelRequested} onClick={() => cancel.mutate()}>
            {run.cancelRequested ? 'Cancelling' : 'Cancel run'}
          </Button>
        )}
        {confirming ? (
          <span className="inline-flex items-baseline gap-2">
            <span className="text-xs text-ink-soft">Delete this run and its points for the whole team?</span>
            <Button variant="danger" busy={remove.isPending} onClick={() => remove.mutate(run.id, { onSuccess: () => navigate('/runs') })}>
              Delete
            </Button>
            <Button variant="quiet" onClick={() => setConfirming(false)}>
              Keep
            </Button>
          </span>
        ) : (
          <Button variant="quiet" className="text-ink-soft" onClick={() => setConfirming(true)}>
            Delete run
          </Button>
        )}
      </div>
      {error && (
        <p role="alert" className="text-xs text-danger">
          {error.message}
        </p>
      )}
    </div>
  );
}

/** A run opened from a study cell names the study (linked) and the cell, so its numbers can be traced back. */
function StudyCellOrigin({ request }: { request: unknown }) {
  const origin = runOriginOf(request);
  if (!origin) return null;
  return (
    <>
      <span aria-hidden>·</span>
      <span data-testid="run-origin">
        <Link to={`/studies/${origin.studyId}`} className="text-accent hover:underline">
          {runOriginText(origin)}
        </Link>
      </span>
    </>
  );
}
