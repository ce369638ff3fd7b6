import { Link, useSearchParams } from 'react-router';
import { regionKinds, regionLabels } from '@shared/regions';
import { studyStatuses, type ListStudiesQuery } from '@shared/studies';
import { Button } from '../../../ui/Button';
import { SelectField, TextField } from '../../../ui/Field';
import { useMembers } from '../../team/api/team';
import { formatDateTime } from '../../../lib/format';
import { PageHeader } from '../../../ui/Page';
import { Empty, ErrorState, Loading } from '../../../ui/States';
import { useCan } from '../../../lib/permissions';
import { StatusLabel } from '../../../ui/StatusLabel';
import { ComputeTimingLine } from '../../../ui/ComputeTimingLine';
import { useStudies } from '../api/studies';

const th = 'border-b border-ink-faint px-2 py-1.5 text-left text-xs font-medium text-ink-soft';
const td = 'border-b border-rule px-2 py-2 align-baseline';

/** The list's filters, kept in the URL so a filtered list can be reloaded, shared and gone back to. */
const filterKeys = ['search', 'status', 'regionKind', 'authorId', 'createdFrom', 'createdTo'] as const;

function StudyFilters({ filters, onChange }: { filters: Record<(typeof filterKeys)[number], string>; onChange(key: (typeof filterKeys)[number], value: string): void }) {
  const members = useMembers();
  return (
    <div className="mb-6 grid grid-cols-1 gap-x-6 gap-y-4 sm:grid-cols-3 lg:grid-cols-7" data-testid="study-filters" role="search">
      <div className="sm:col-span-3 lg:col-span-2">
        <TextField label="Search" name="search" type="search" value={filters.search} onChange={(e) => onChange('search', e.target.value)} placeholder="words of the title, or the id" />
      </div>
      <SelectField label="Status" name="status" value={filters.status} onChange={(e) => onChange('status', e.target.value)}>
        <option value="">any</option>
        {studyStatuses.map((status) => (
          <option key={status} value={status}>
            {status}
          </option>
        ))}
      </SelectField>
      <SelectField label="Region" name="regionKind" value={filters.regionKind} onChange={(e) => onChange('regionKind', e.target.value)}>
        <option value="">any</option>
        {regionKinds.map((kind) => (
          <option key={kind} value={kind}>
            {regionLabels[kind]}
          </option>
        ))}
        <option value="imported">imported causal sets</option>
      </SelectField>
      <SelectField label="Author" name="authorId" value={filters.authorId} onChange={(e) => onChange('authorId', e.target.value)}>
        <option value="">anyone</option>
        {(members.data ?? []).map((m) => (
          <option key={m.userId} value={m.userId}>
            {m.name}
          </option>
        ))}
      </SelectField>
      <div className="grid grid-cols-2 gap-4 sm:col-span-3 lg:col-span-2">
        <TextField label="Created from" name="createdFrom" type="date" value={filters.createdFrom} onChange={(e) => onChange('createdFrom', e.target.value)} />
        <TextField label="Created until" name="createdTo" type="date" value={filters.createdTo} onChange={(e) => onChange('createdTo', e.target.value)} />
      </div>
    </div>
  );
}

export function StudiesPage() {
  const [searchParams, setSearchParams] = useSearchParams();
  const filters = Object.fromEntries(filterKeys.map((k) => [k, searchParams.get(k) ?? ''])) as Record<(typeof filterKeys)[number], string>;
  const filtered = filterKeys.some((k) => filters[k] !== '');
  const query = Object.fromEntries(Object.entries(filters).filter(([, v]) => v.trim() !== '')) as ListStudiesQuery;
  const studies = useStudies(query);
  const canCompute = useCan('compute');
  const setFilter = (key: (typeof filterKeys)[number], value: string) =>
    setSearchParams(
      (params) => {
        const next = new URLSearchParams(params);
        if (value === '') next.delete(key);
        else next.set(key, value);
        return next;
      },
      { replace: true },
    );
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
      <StudyFilters filters={filters} onChange={setFilter} />
      {studies.isPending ? (
        <Loading label="Loading studies" />
      ) : studies.isError ? (
        <ErrorState error={studies.error} onRetry={() => studies.refetch()} />
      ) : studies.data.items.length === 0 && filtered ? (
        <Empty>
          No study matches these filters.{' '}
          <Button variant="quiet" onClick={() => setSearchParams({}, { replace: true })}>
            Clear the filters
          </Button>
        </Empty>
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
