import { Link, useNavigate, useParams } from 'react-router';
import { formatDateTime } from '../../../lib/format';
import { Button } from '../../../ui/Button';
import { BundleDownload } from '../../../ui/BundleDownload';
import { ExportDownloads } from '../../../ui/ExportDownloads';
import { PageHeader, Section } from '../../../ui/Page';
import { ErrorState, Loading } from '../../../ui/States';
import { useCan } from '../../../lib/permissions';
import { StatusLabel } from '../../../ui/StatusLabel';
import { findRegionDescriptor } from '@shared/regions';
import { isStudyActive, useCancelStudy, useDeleteStudy, useRetryFailedCells, useStudy } from '../api/studies';
import { ExtendStudyForm } from '../components/ExtendStudyForm';
import { StudyCells } from '../components/StudyCells';
import { StudyCaution, StudyProgress } from '../components/StudyProgress';
import { RuleCautions } from '../../../ui/Caution';
import { StudyPlots } from '../components/StudyPlots';
import { AggregateTable, FitsTable, PairFitsTable, PairTable, RenyiTable } from '../components/StudyTables';
import { fitQuantity } from '@shared/studies';

export function StudyPage() {
  const { studyId = '' } = useParams();
  const study = useStudy(studyId);
  const canCompute = useCan('compute');
  const cancel = useCancelStudy(studyId);
  const remove = useDeleteStudy(studyId);
  const retryFailed = useRetryFailedCells(studyId);
  const navigate = useNavigate();

  if (study.isPending) return <Loading label="Loading the study" />;
  if (study.isError) return <ErrorState error={study.error} onRetry={() => study.refetch()} />;
  const s = study.data;
  const subregionLabels = Object.fromEntries(s.subregions.map((x) => [x.key, x.label]));
  const pairs = s.aggregates.some((a) => a.pair);
  const hasRenyi = s.aggregates.some((a) => (a.pair ? a.pair.renyiI : a.renyi));
  const entropyFits = s.fits.some((f) => f.model === 'log' && fitQuantity(f) === 'S');
  const pairFits = s.fits.some((f) => f.model === 'loglog');

  return (
    <>
      <PageHeader
        title={s.title || `Study ${s.id.slice(0, 8)}`}
        context={
          <span className="flex flex-wrap items-baseline gap-x-4">
            <StatusLabel status={s.status} />
            <span>
              N ∈ <span className="figures">{'{'}{s.counts.join(', ')}{'}'}</span> ×{' '}
              {s.source === 'imported' ? (
                <>
                  <span className="figures">{s.seedCount}</span> imported causal set{s.seedCount === 1 ? '' : 's'} in all ×{' '}
                </>
              ) : (
                <>
                  <span className="figures">{s.seedCount}</span> seeds ×{' '}
                </>
              )}
              {s.subregions.length} subregion{s.subregions.length === 1 ? '' : 's'} × {s.rules.length} rule{s.rules.length === 1 ? '' : 's'}
              {s.regionKind !== 'imported' && <> · {findRegionDescriptor(s.regionKind)?.label ?? s.regionKind}</>}
            </span>
            <span>
              {s.author.name}, {formatDateTime(s.createdAt)}
            </span>
          </span>
        }
        actions={
          <>
            <Link to="/studies" className="text-sm text-accent hover:underline">
              All studies
            </Link>
            {canCompute && (
              <Link to={`/studies/new?from=${s.id}`} className="text-sm text-accent hover:underline">
                Duplicate
              </Link>
            )}
            {canCompute && s.progress.failed > 0 && s.status !== 'cancelled' && (
              <Button variant="quiet" busy={retryFailed.isPending} onClick={() => retryFailed.mutate()}>
                Retry failed cells
              </Button>
            )}
            {canCompute && isStudyActive(s.status) && (
              <Button variant="quiet" busy={cancel.isPending} onClick={() => cancel.mutate()}>
                Cancel
              </Button>
            )}
            {canCompute && (
              <Button
                variant="danger"
                busy={remove.isPending}
                onClick={async () => {
                  if (!window.confirm('Delete this study and every result in it?')) return;
                  await remove.mutateAsync();
                  navigate('/studies');
                }}
              >
                Delete
              </Button>
            )}
          </>
        }
      />
      <Section title="Progress">
        <StudyProgress study={s} />
        {retryFailed.isError && (
          <p role="alert" className="mt-3 text-sm text-danger">
            {retryFailed.error.message}
          </p>
        )}
      </Section>
      {s.causalSets.length > 0 && (
        <Section title="Imported causal sets" aside="each stands for one sprinkling">
          <div className="overflow-x-auto">
            <table className="text-sm">
              <thead>
                <tr className="text-left text-xs tracking-wide text-ink-soft">
                  <th className="border-b border-rule py-1.5 pr-4 font-normal">name</th>
                  <th className="border-b border-rule py-1.5 pr-4 font-normal">N</th>
                  <th className="border-b border-rule py-1.5 pr-4 font-normal">file</th>
                  <th className="border-b border-rule py-1.5 pr-4 font-normal">SHA-256</th>
                </tr>
              </thead>
              <tbody>
                {s.causalSets.map((c) => (
                  <tr key={c.id}>
                    <td className="border-b border-rule/60 py-1.5 pr-4">
                      <Link to={`/causal-sets/${c.id}`} className="text-accent hover:underline">
                        {c.name}
                      </Link>
                    </td>
                    <td className="figures border-b border-rule/60 py-1.5 pr-4">{c.N}</td>
                    <td className="border-b border-rule/60 py-1.5 pr-4 font-mono text-xs">{c.fileName}</td>
                    <td className="border-b border-rule/60 py-1.5 pr-4 font-mono text-xs text-ink-faint" title={c.checksum}>
                      {c.checksum.slice(0, 16)}…
                    </td>
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
        </Section>
      )}
      <div className="mb-10 flex flex-col gap-3">
        <StudyCaution />
        <RuleCautions cautions={s.cautions} />
      </div>
      {s.aggregates.length > 0 && (
        <>
          {pairs ? (
            <Section title="Mutual information" aside="per N, pair and rule">
              <PairTable aggregates={s.aggregates} rules={s.rules} ruleLabels={s.ruleLabels} />
            </Section>
          ) : (
            <Section title="Ensemble means" aside="per N, subregion and rule">
              <AggregateTable aggregates={s.aggregates} rules={s.rules} ruleLabels={s.ruleLabels} subregionLabels={subregionLabels} />
            </Section>
          )}
          {hasRenyi && (
            <Section title={pairs ? 'Rényi mutual information' : 'Rényi entropies'} aside={pairs ? 'I_α = S_α(A) + S_α(B) − S_α(A∪B)' : 'S_α from the same μ as S'}>
              <RenyiTable aggregates={s.aggregates} ruleLabels={s.ruleLabels} subregionLabels={subregionLabels} />
            </Section>
          )}
          <Section title="Fits">
            {pairs ? (
              pairFits ? (
                <PairFitsTable fits={s.fits} ruleLabels={s.ruleLabels} />
              ) : (
                <p className="text-sm text-ink-soft">A log-log fit of I against d needs three separations with ⟨I⟩ &gt; 0 per rule, ℓ/T and N.</p>
              )
            ) : entropyFits ? (
              <FitsTable fits={s.fits} ruleLabels={s.ruleLabels} subregionLabels={subregionLabels} />
            ) : (
              <p className="text-sm text-ink-soft">A fit needs at least three points (finished ensembles of different n) per rule; it appears as the cells come in.</p>
            )}
          </Section>
          <Section title="Figures">
            <StudyPlots study={s} />
          </Section>
        </>
      )}
      <Section title="Cells" aside="one sprinkling each">
        <StudyCells study={s} canCompute={canCompute} />
      </Section>
      {canCompute && s.source === 'sprinkled' && s.status !== 'cancelled' && (
        <Section title="Extend" aside="more N values or seeds">
          <ExtendStudyForm study={s} />
        </Section>
      )}
      <Section title="Downloads">
        <ExportDownloads kind="study" id={s.id} disabled={s.progress.done === 0} testId="study-downloads">
          {s.progress.done > 0 ? 'Exports cover the sprinklings finished so far.' : 'Exports become available when the first sprinkling has finished.'} Each
          figure has its own PNG and SVG download beneath it.
        </ExportDownloads>
        <BundleDownload target={{ kind: 'study', id: s.id }} disabled={s.progress.done === 0} disabledReason="The bundle becomes available when the first sprinkling has finished." testId="study-bundle" />
      </Section>
    </>
  );
}
