import { useState } from 'react';
import { Link, useNavigate, useSearchParams } from 'react-router';
import { runStatuses, type RunStatus, type RunSummary } from '@shared/runs';
import { formatDateTime } from '../../../lib/format';
import { BundleDownload } from '../../../ui/BundleDownload';
import { Button } from '../../../ui/Button';
import { SelectField, TextField } from '../../../ui/Field';
import { PageHeader } from '../../../ui/Page';
import { Empty, ErrorState, Loading } from '../../../ui/States';
import { useCan } from '../../../lib/permissions';
import { describeRestrictedCutText, describeTruncationText } from '../../../lib/truncationForm';
import { isActive, useRuns, type RunFilters } from '../api/runs';
import { Checkbox } from '../../../ui/Checkbox';
import { Figure } from '../../../ui/Figure';
import { StatusLabel, statusLabels } from '../../../ui/StatusLabel';
import { ComputeTimingLine } from '../../../ui/ComputeTimingLine';
import { regionLabels } from '../lib/runForm';
import { maxCompared, runLabel } from '../lib/runIds';

const pageSize = 25;
type SortField = 'createdAt' | 'N' | 'S' | 'status';

/** Filters live in the address, so a filtered table can be bookmarked and shared. */
function filtersFrom(params: URLSearchParams): RunFilters {
  const status = params.get('status');
  const regionKind = params.get('region');
  const sort = params.get('sort');
  return {
    status: status && (runStatuses as readonly string[]).includes(status) ? (status as RunStatus) : undefined,
    regionKind: (regionKind && regionKind in regionLabels ? regionKind : undefined) as RunFilters['regionKind'],
    search: params.get('q') ?? undefined,
    sort: (sort && ['createdAt', 'N', 'S', 'status'].includes(sort) ? sort : 'createdAt') as SortField,
    order: params.get('order') === 'asc' ? 'asc' : 'desc',
    page: Math.max(1, Number(params.get('page')) || 1),
    pageSize,
  };
}

export function RunsPage() {
  const [params, setParams] = useSearchParams();
  const filters = filtersFrom(params);
  const runs = useRuns(filters);
  const canCompute = useCan('compute');
  const [selected, setSelected] = useState<string[]>([]);
  const [search, setSearch] = useState(filters.search ?? '');
  const navigate = useNavigate();

  function update(changes: Record<string, string | undefined>) {
    const next = new URLSearchParams(params);
    for (const [key, value] of Object.entries(changes)) {
      if (value === undefined || value === '') next.delete(key);
      else next.set(key, value);
    }
    if (!('page' in changes)) next.delete('page');
    setParams(next, { replace: true });
  }

  function sortBy(field: SortField) {
    const order = filters.sort === field && filters.order === 'desc' ? 'asc' : 'desc';
    update({ sort: field, order });
  }

  function toggle(runId: string, on: boolean) {
    setSelected((ids) => (on ? [...ids, runId].slice(-maxCompared) : ids.filter((id) => id !== runId)));
  }

  const total = runs.data?.total ?? 0;
  const page = filters.page ?? 1;
  const first = total === 0 ? 0 : (page - 1) * pageSize + 1;
  const last = Math.min(total, page * pageSize);

  return (
    <>
      <PageHeader
        title="Runs"
        context="Vacuum runs of this team: one SJ state per causal set, its spectrum and, where asked, a subregion's entropy."
        actions={
          <>
            <Button
              variant="quiet"
              disabled={selected.length < 2}
              title={selected.length < 2 ? 'Tick 2 to 6 finished runs to compare their spectra' : undefined}
              onClick={() => navigate(`/runs/compare?ids=${selected.join(',')}`)}
            >
              Compare {selected.length > 0 ? <span className="figures">({selected.length})</span> : null}
            </Button>
            {canCompute && (
              <Link to="/runs/new" className="rounded-sm bg-accent px-4 py-1.5 text-sm font-medium text-paper hover:bg-accent-deep">
                New run
              </Link>
            )}
          </>
        }
      />

      <p className="-mt-2 mb-4 text-sm text-ink-soft" data-testid="compare-explanation">
        Compare: tick 2 to 6 finished runs in the list below to see their spectra and entropies side by side.
      </p>
      <div className="-mt-5 mb-4">
        <BundleDownload target={{ kind: 'runs', ids: selected }} disabled={selected.length === 0} disabledReason="Tick finished runs in the list to bundle them" testId="runs-bundle" />
      </div>

      <form
        className="mb-6 grid grid-cols-1 items-end gap-6 sm:grid-cols-[1fr_10rem_12rem]"
        role="search"
        onSubmit={(e) => {
          e.preventDefault();
          update({ q: search.trim() });
        }}
      >
        <TextField
          label="Search titles"
          name="search"
          value={search}
          onChange={(e) => setSearch(e.target.value)}
          onBlur={() => search.trim() !== (filters.search ?? '') && update({ q: search.trim() })}
          placeholder="title or id"
        />
        <SelectField label="Status" name="status" value={filters.status ?? ''} onChange={(e) => update({ status: e.target.value })}>
          <option value="">Any</option>
          {runStatuses.map((s) => (
            <option key={s} value={s}>
              {statusLabels[s]}
            </option>
          ))}
        </SelectField>
        <SelectField label="Region" name="region" value={filters.regionKind ?? ''} onChange={(e) => update({ region: e.target.value })}>
          <option value="">Any</option>
          {Object.entries(regionLabels).map(([kind, label]) => (
            <option key={kind} value={kind}>
              {label}
            </option>
          ))}
        </SelectField>
      </form>

      {runs.isPending ? (
        <Loading label="Loading runs" />
      ) : runs.isError ? (
        <ErrorState error={runs.error} onRetry={() => runs.refetch()} />
      ) : runs.data.items.length === 0 ? (
        <Empty>
          {params.toString() ? 'No run matches these filters.' : 'No runs yet.'}{' '}
          {canCompute && !params.toString() && (
            <Link to="/runs/new" className="text-accent hover:underline">
              Start the first one.
            </Link>
          )}
        </Empty>
      ) : (
        <>
          <div className="overflow-x-auto">
          <table className="w-full border-collapse text-sm" aria-label="Runs">
            <thead>
              <tr className="border-b border-ink/70 text-left text-xs text-ink-faint">
                <th className="w-8 py-2 font-normal">
                  <span className="sr-only">Compare</span>
                </th>
                <th className="py-2 pr-4 font-normal">Run</th>
                <SortHeader field="status" label="Status" filters={filters} onSort={sortBy} />
                <th className="py-2 pr-4 font-normal">Region</th>
                <SortHeader field="N" label="N" filters={filters} onSort={sortBy} align="right" />
                <th className="py-2 pr-4 font-normal">Truncation</th>
                <SortHeader field="S" label="S" filters={filters} onSort={sortBy} align="right" />
                <th className="py-2 pr-4 font-normal">Author</th>
                <SortHeader field="createdAt" label="Created" filters={filters} onSort={sortBy} align="right" />
              </tr>
            </thead>
            <tbody>
              {runs.data.items.map((run) => (
                <tr key={run.id} className="border-b border-rule align-baseline hover:bg-paper-deep/60" data-testid={`run-${run.id}`}>
                  <td className="py-2.5">
                    <Checkbox
                      label={<span className="sr-only">Compare {runLabel(run)}</span>}
                      // Only finished runs have a spectrum to overlay.
                      disabled={run.status !== 'done'}
                      checked={selected.includes(run.id)}
                      onChange={(on) => toggle(run.id, on)}
                    />
                  </td>
                  <td className="py-2.5 pr-4">
                    <Link to={`/runs/${run.id}`} className="text-ink hover:text-accent hover:underline">
                      {runLabel(run)}
                    </Link>
                    {run.parentRunId && <span className="ml-2 text-xs text-ink-faint">re-analysis</span>}
                  </td>
                  <td className="py-2.5 pr-4">
                    <StatusLabel status={run.status} percent={run.percent} />
                    {isActive(run.status) && <ComputeTimingLine status={run.status} timing={run.timing} className="block text-xs text-ink-faint" />}
                  </td>
                  <td className="py-2.5 pr-4 text-ink-soft">{regionLabels[run.regionKind] ?? run.regionKind}</td>
                  <td className="py-2.5 pr-4 text-right">
                    <span className="figures">{run.N ?? '—'}</span>
                  </td>
                  <td className="py-2.5 pr-4 text-ink-soft">
                    {describeTruncationText(run.truncation)}
                    {run.restrictedCut && <span className="block text-xs text-ink-faint">restricted {describeRestrictedCutText(run.restrictedCut)}</span>}
                  </td>
                  <td className="py-2.5 pr-4 text-right">
                    <Figure value={run.S} whole={3} fraction={6} />
                  </td>
                  <td className="py-2.5 pr-4 text-ink-soft">{run.author.name}</td>
                  <td className="figures py-2.5 text-right text-ink-soft">{formatDateTime(run.createdAt)}</td>
                </tr>
              ))}
            </tbody>
          </table>
          </div>
          <div className="mt-4 flex items-center justify-between text-sm text-ink-soft">
            <span className="figures">
              {first}–{last} of {total}
            </span>
            <span className="flex gap-4">
              <Button variant="quiet" disabled={page <= 1} onClick={() => update({ page: String(page - 1) })}>
                Previous
              </Button>
              <Button variant="quiet" disabled={last >= total} onClick={() => update({ page: String(page + 1) })}>
                Next
              </Button>
            </span>
          </div>
        </>
      )}
    </>
  );
}

function SortHeader({
  field,
  label,
  filters,
  onSort,
  align = 'left',
}: {
  field: SortField;
  label: string;
  filters: RunFilters;
  onSort(field: SortField): void;
  align?: 'left' | 'right';
}) {
  const active = filters.sort === field;
  return (
    <th
      className={`py-2 pr-4 font-normal ${align === 'right' ? 'text-right' : ''}`}
      aria-sort={active ? (filters.order === 'asc' ? 'ascending' : 'descending') : 'none'}
    >
      <button type="button" className={`cursor-pointer hover:text-ink ${active ? 'text-ink' : ''}`} onClick={() => onSort(field)}>
        {label}
        <span aria-hidden className="ml-1 font-mono">
          {active ? (filters.order === 'asc' ? '↑' : '↓') : ''}
        </span>
      </button>
    </th>
  );
}
