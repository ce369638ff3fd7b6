import type { ReactNode } from 'react';
import { describeRegion, type CausalSetSummary } from '@shared/causalSets';
import { Figure } from '../../../ui/Figure';
import { formatBytes } from '../lib/importForm';

function Row({ label, children, note }: { label: string; children: ReactNode; note?: string }) {
  return (
    <tr className="border-b border-rule align-baseline">
      <th scope="row" className="py-2 pr-4 text-left font-normal text-ink-soft">
        {label}
        {note && <span className="block text-xs text-ink-faint">{note}</span>}
      </th>
      <td className="whitespace-nowrap py-2 text-right">{children}</td>
    </tr>
  );
}

/** The numbers of an imported causal set, decimals aligned, and the file it came from. */
export function CausalSetStats({ set }: { set: CausalSetSummary }) {
  const s = set.stats;
  return (
    <>
      <table className="w-full border-collapse text-sm" aria-label="Summary">
        <tbody>
          <Row label="Elements N">
            <Figure value={set.N} />
          </Row>
          <Row label="Dimension">
            <Figure value={set.dimension} />
          </Row>
          {set.region && (
            <Row label="Volume V" note={describeRegion(set.region)}>
              <Figure value={set.volume} kind="measure" />
            </Row>
          )}
          <Row label="Density ρ" note={set.density === null ? 'none given: massless 2D fields only' : set.region ? 'N / V' : 'as given'}>
            <Figure value={set.density} kind="measure" />
          </Row>
          <Row label="Relations R" note="pairs i ≺ j, after transitive closure">
            <Figure value={s.relations} />
          </Row>
          <Row label="Links" note="relations with nothing between">
            <Figure value={s.links} />
          </Row>
          <Row label="Ordering fraction" note="R / (N choose 2); near 1/2 for a 2D diamond, 1/10 in 4D">
            <Figure value={s.orderingFraction} kind="measure" />
          </Row>
          <Row label="Height" note="elements in a longest chain">
            <Figure value={s.height} />
          </Row>
          <Row label="Minimal elements" note="nothing to their past">
            <Figure value={s.minimal} />
          </Row>
          <Row label="Maximal elements" note="nothing to their future">
            <Figure value={s.maximal} />
          </Row>
        </tbody>
      </table>
      <dl className="mt-4 text-xs text-ink-soft">
        <dt className="text-ink-faint">File</dt>
        <dd className="figures mb-2">
          {set.fileName} · {formatBytes(set.fileBytes)}
        </dd>
        <dt className="text-ink-faint">SHA-256 of the file</dt>
        <dd className="figures break-all">{set.checksum}</dd>
      </dl>
    </>
  );
}
