import { Link } from 'react-router';
import { describeRegion, type CausalSetSummary } from '@shared/causalSets';
import { ErrorState, Loading } from './States';
import { useCausalSets } from '../features/causalSets/api/causalSets';

const th = 'border-b border-rule py-1.5 pr-4 text-left text-xs font-normal tracking-wide text-ink-soft';
const td = 'border-b border-rule/60 py-1.5 pr-4 align-baseline';

/** Short description of what a set carries: the region, the density, or that it is a relation list. */
export function causalSetPlacement(set: Pick<CausalSetSummary, 'kind' | 'region' | 'density'>): string {
  if (set.kind === 'relations') return set.density !== null ? `relations, ρ = ${Number(set.density.toPrecision(4))}` : 'relations';
  return set.region ? describeRegion(set.region) : set.density !== null ? `ρ = ${Number(set.density.toPrecision(4))}` : '—';
}

/**
 * The team's imported causal sets to pick from: one (a run) or several (a study, kept in the order
 * picked). Selected ids that are no longer in the list are dropped by the caller's validation.
 */
export function CausalSetPicker({
  selected,
  onChange,
  multiple = false,
  error,
  name = 'causalSet',
}: {
  selected: string[];
  onChange(ids: string[]): void;
  multiple?: boolean;
  error?: string;
  name?: string;
}) {
  const sets = useCausalSets();
  if (sets.isPending) return <Loading label="Loading the team's causal sets" />;
  if (sets.isError) return <ErrorState error={sets.error} onRetry={() => sets.refetch()} />;
  const items = sets.data.items;
  if (items.length === 0) {
    return (
      <p className="text-sm text-ink-soft">
        The team has no imported causal sets yet.{' '}
        <Link to="/causal-sets/import" className="text-accent hover:underline">
          Import one
        </Link>
        .
      </p>
    );
  }
  const toggle = (id: string, on: boolean) => {
    if (!multiple) return onChange(on ? [id] : []);
    onChange(on ? [...selected.filter((s) => s !== id), id] : selected.filter((s) => s !== id));
  };
  return (
    <div className="flex flex-col gap-1">
      <div className="overflow-x-auto">
        <table className="w-full text-sm" aria-label="Imported causal sets">
          <thead>
            <tr>
              <th className={th}>
                <span className="sr-only">pick</span>
              </th>
              <th className={th}>name</th>
              <th className={th}>N</th>
              <th className={th}>kind</th>
              <th className={th}>region or density</th>
              <th className={th}>file</th>
            </tr>
          </thead>
          <tbody>
            {items.map((set) => {
              const checked = selected.includes(set.id);
              const inputId = `${name}-${set.id}`;
              return (
                <tr key={set.id} className={checked ? 'bg-accent/5' : undefined}>
                  <td className={`${td} w-8`}>
                    <input
                      id={inputId}
                      type={multiple ? 'checkbox' : 'radio'}
                      name={name}
                      value={set.id}
                      checked={checked}
                      onChange={(e) => toggle(set.id, e.target.checked)}
                      className="size-4 accent-accent"
                    />
                  </td>
                  <td className={td}>
                    <label htmlFor={inputId} className="cursor-pointer text-ink">
                      {set.name}
                    </label>
                  </td>
                  <td className={`${td} figures`}>{set.N}</td>
                  <td className={`${td} text-ink-soft`}>
                    {set.kind === 'coordinates' ? `${set.dimension}D points` : `${set.dimension}D relation list`}
                    {set.warnings.length > 0 && (
                      <span className="ml-2 text-danger" title={set.warnings.join(' ')}>
                        · dimension in doubt
                      </span>
                    )}
                  </td>
                  <td className={`${td} text-ink-soft`}>{causalSetPlacement(set)}</td>
                  <td className={`${td} font-mono text-xs text-ink-faint`}>{set.fileName}</td>
                </tr>
              );
            })}
          </tbody>
        </table>
      </div>
      {error && (
        <p className="text-xs text-danger" role="alert">
          {error}
        </p>
      )}
    </div>
  );
}
