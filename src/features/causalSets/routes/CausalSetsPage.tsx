import { Link } from 'react-router';
import { describeRegion } from '@shared/causalSets';
import { formatDateTime } from '../../../lib/format';
import { PageHeader } from '../../../ui/Page';
import { Empty, ErrorState, Loading } from '../../../ui/States';
import { useCan } from '../../../lib/permissions';
import { Figure } from '../../../ui/Figure';
import { useCausalSets } from '../api/causalSets';

export const kindLabels = { coordinates: 'Coordinates', relations: 'Relations' } as const;

export function CausalSetsPage() {
  const sets = useCausalSets();
  const canCompute = useCan('compute');
  return (
    <>
      <PageHeader
        title="Causal sets"
        context="Imported causal sets of this team: sprinklings and orders made elsewhere, ready for vacuum runs."
        actions={
          canCompute && (
            <Link to="/causal-sets/import" className="rounded-sm bg-accent px-4 py-1.5 text-sm font-medium text-paper hover:bg-accent-deep">
              Import
            </Link>
          )
        }
      />
      {sets.isPending ? (
        <Loading label="Loading causal sets" />
      ) : sets.isError ? (
        <ErrorState error={sets.error} onRetry={() => sets.refetch()} />
      ) : sets.data.items.length === 0 ? (
        <Empty>
          No imported causal sets yet.{' '}
          {canCompute && (
            <Link to="/causal-sets/import" className="text-accent hover:underline">
              Import a coordinates CSV or a relation list.
            </Link>
          )}
        </Empty>
      ) : (
        <table className="w-full border-collapse text-sm" aria-label="Causal sets">
          <thead>
            <tr className="border-b border-ink/70 text-left text-xs text-ink-faint">
              <th className="py-2 pr-4 font-normal">Name</th>
              <th className="py-2 pr-4 font-normal">Kind</th>
              <th className="py-2 pr-4 text-right font-normal">D</th>
              <th className="py-2 pr-4 text-right font-normal">N</th>
              <th className="py-2 pr-4 font-normal">Region or density</th>
              <th className="py-2 pr-4 text-right font-normal">Ordering fraction</th>
              <th className="py-2 pr-4 font-normal">Imported by</th>
              <th className="py-2 text-right font-normal">Imported</th>
            </tr>
          </thead>
          <tbody>
            {sets.data.items.map((set) => (
              <tr key={set.id} className="border-b border-rule align-baseline hover:bg-paper-deep/60">
                <td className="py-2.5 pr-4">
                  <Link to={`/causal-sets/${set.id}`} className="text-ink hover:text-accent hover:underline">
                    {set.name}
                  </Link>
                  <span className="figures ml-2 text-xs text-ink-faint">{set.fileName}</span>
                </td>
                <td className="py-2.5 pr-4 text-ink-soft">{kindLabels[set.kind]}</td>
                <td className="figures py-2.5 pr-4 text-right">{set.dimension}</td>
                <td className="figures py-2.5 pr-4 text-right">{set.N}</td>
                <td className="py-2.5 pr-4 text-ink-soft">
                  {set.region ? describeRegion(set.region) : set.density !== null ? <span className="figures">ρ = {set.density}</span> : '—'}
                </td>
                <td className="py-2.5 pr-4 text-right">
                  <Figure value={set.stats.orderingFraction} whole={2} fraction={7} digits={4} />
                </td>
                <td className="py-2.5 pr-4 text-ink-soft">{set.createdBy.name}</td>
                <td className="figures py-2.5 text-right text-ink-soft">{formatDateTime(set.createdAt)}</td>
              </tr>
            ))}
          </tbody>
        </table>
      )}
    </>
  );
}
