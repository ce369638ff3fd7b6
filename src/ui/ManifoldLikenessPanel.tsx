import { formatDimension, longestChainConstant, type ManifoldLikenessReport } from '@shared/manifoldLikeness';
import { Figure } from './Figure';

/**
 * The manifold-likeness of a causal set (server/engine/README.md §16): the two dimension estimators
 * beside the declared dimension, the longest chain against m_d (ρV)^{1/d}, and the interval abundances.
 * Shown on the causal-set and run pages alike.
 */
export function ManifoldLikenessPanel({
  report,
  declaredDimension,
  expectedElements,
}: {
  report: ManifoldLikenessReport;
  declaredDimension: number;
  /** ρV when the region (or density and volume) is known; N stands in otherwise */
  expectedElements: number | null;
}) {
  const { myrheimMeyer, midpoint } = report.dimension;
  const scale = Math.pow(expectedElements ?? report.N, 1 / declaredDimension);
  const chainRatio = scale > 0 ? report.longestChain / scale : null;
  const constant = longestChainConstant(declaredDimension);
  const expected = constant.low === constant.high ? `m = ${constant.low}` : `${constant.low} ≤ m ≤ ${constant.high}`;
  return (
    <div className="flex flex-col gap-3 text-sm" data-testid="manifold-likeness">
      <table className="w-full border-collapse" aria-label="Manifold-likeness">
        <tbody>
          <tr className="border-b border-rule align-baseline">
            <th scope="row" className="py-2 pr-4 text-left font-normal text-ink-soft">
              Myrheim–Meyer dimension
              <span className="block text-xs text-ink-faint">from the ordering fraction; error from {myrheimMeyer.subIntervals} sub-intervals</span>
            </th>
            <td className="figures whitespace-nowrap py-2 text-right">{myrheimMeyer.estimate === null ? '—' : formatDimension(myrheimMeyer.estimate, myrheimMeyer.error)}</td>
          </tr>
          <tr className="border-b border-rule align-baseline">
            <th scope="row" className="py-2 pr-4 text-left font-normal text-ink-soft">
              Midpoint-scaling dimension
              <span className="block text-xs text-ink-faint">log₂(N / N<sub>½</sub>), N<sub>½</sub> = {midpoint.halfSize} at the midpoint element</span>
            </th>
            <td className="figures whitespace-nowrap py-2 text-right">{midpoint.estimate === null ? '—' : formatDimension(midpoint.estimate, null)}</td>
          </tr>
          <tr className="border-b border-rule align-baseline">
            <th scope="row" className="py-2 pr-4 text-left font-normal text-ink-soft">
              Longest chain / (ρV)<sup>1/{declaredDimension}</sup>
              <span className="block text-xs text-ink-faint">
                {report.longestChain} elements; a {declaredDimension}D diamond tends to {expected} (Brightwell–Gregory), approached slowly from below
              </span>
            </th>
            <td className="whitespace-nowrap py-2 text-right">
              <Figure value={chainRatio} kind="fit" />
            </td>
          </tr>
        </tbody>
      </table>
      <div>
        <p className="text-xs text-ink-soft">Interval abundances N<sub>k</sub>: related pairs with k elements between (N<sub>0</sub> = links)</p>
        <div className="mt-1 overflow-x-auto">
        <table className="figures w-full border-collapse text-xs" aria-label="Interval abundances">
          <thead>
            <tr className="text-ink-faint">
              {report.intervalAbundances.map((_, k) => (
                <th key={k} scope="col" className="px-1 text-right font-normal">
                  {k}
                </th>
              ))}
            </tr>
          </thead>
          <tbody>
            <tr>
              {report.intervalAbundances.map((count, k) => (
                <td key={k} className="px-1 text-right">
                  {count}
                </td>
              ))}
            </tr>
          </tbody>
        </table>
        </div>
      </div>
      <p className="text-xs text-ink-faint">
        Both estimators assume the set is a causal diamond of flat spacetime; a slab, a curved region or a few hundred elements read
        differently. Take a disagreement as a prompt to look, not as proof.
      </p>
    </div>
  );
}
