import { Link } from 'react-router';
import { formatDateTime } from '../../../lib/format';
import { PageHeader } from '../../../ui/Page';
import { Empty, ErrorState, Loading } from '../../../ui/States';
import { useCan } from '../../../lib/permissions';
import { StatusLabel } from '../../../ui/StatusLabel';
import { ComputeTimingLine } from '../../../ui/ComputeTimingLine';
import { useStudies } from '../api/studies';

const th = 'border-b border-ink-faint px-2 py-1.5 text-left text-xs font-medium text-ink-soft';
const td = 'border-b border-rule px-2 py-2 align-baseline';

export function StudiesPage() {
  const studies = useStudies();
  const canCompute = useCan('compute');
  return (
    <>
      <PageHeader
        title="Studies"
        context="Scaling studies of this team: entropies over N, subregion sizes, seeds and cut rules, with ensemble means and fits."
        actions={
          canCompute && (
            <Link to="/studies/new" className="rounded-sm bg-accent px-4 py-1.5 text-sm font-medium text-paper hover:bg-accent-deep">
              New study
            </Link>
          )
        }
      />
      {studies.isPending ? (
        <Loading label="Loading studies" />
      ) : studies.isError ? (
        <ErrorState error={studies.error} onRetry={() => studies.refetch()} />
      ) : studies.data.items.length === 0 ? (
        <Empty>
          No studies yet.{' '}
          {canCompute && (
            <Link to="/studies/new" className="text-accent hover:underline">
              Plan the first one.
            </Link>
          )}
        </Empty>
      ) : (
        <div className="overflow-x-auto">
          <table className="w-full border-collapse text-sm" data-testid="studies-table">
            <thead>
              <tr>
                <th className={th}>study</th>
                <th className={th}>status</th>
                <th className={th}>progress</th>
                <th className={th}>N</th>
                <th className={th}>seeds</th>
                <th className={th}>rules</th>
                <th className={th}>author</th>
                <th className={th}>created</th>
              </tr>
            </thead>
            <tbody>
              {studies.data.items.map((s) => (
                <tr key={s.id}>
                  <td className={td}>
                    <Link to={`/studies/${s.id}`} className="text-accent hover:underline">
                      {s.title || <span className="font-mono text-xs">{s.id.slice(0, 8)}</span>}
                    </Link>
                  </td>
                  <td className={td}>
                    <StatusLabel status={s.status} />
                    {(s.status === 'queued' || s.status === 'running') && <ComputeTimingLine status={s.status} timing={s.timing} className="block text-xs text-ink-faint" />}
                  </td>
                  <td className={`${td} figures text-xs`}>
                    {s.progress.done} of {s.progress.total}
                    {s.progress.failed > 0 && <span className="ml-2 text-danger">{s.progress.failed} failed</span>}
                  </td>
                  <td className={`${td} figures text-xs`}>{s.counts.join(', ')}</td>
                  <td className={`${td} figures text-xs`} title={s.source === 'imported' ? 'imported causal sets in all' : 'seeds per N'}>
                    {s.source === 'imported' ? `${s.seedCount} sets` : s.seedCount}
                  </td>
                  <td className={`${td} font-mono text-xs`}>{s.rules.join(', ')}</td>
                  <td className={td}>{s.author.name}</td>
                  <td className={`${td} text-xs text-ink-soft`}>{formatDateTime(s.createdAt)}</td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      )}
    </>
  );
}
