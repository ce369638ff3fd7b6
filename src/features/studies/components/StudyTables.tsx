import type { StudyAggregate, StudyFit } from '@shared/studies';
import { Figure } from '../../../ui/Figure';

const th = 'border-b border-ink-faint px-2 py-1.5 text-left text-xs font-medium text-ink-soft';
const td = 'border-b border-rule px-2 py-1';

/** The ensemble table: one row per (N, subregion), ⟨S⟩ ± SE per rule, numbers aligned on the point. */
export function AggregateTable({
  aggregates,
  rules,
  ruleLabels,
  subregionLabels,
}: {
  aggregates: StudyAggregate[];
  rules: string[];
  ruleLabels: Record<string, string>;
  subregionLabels: Record<string, string>;
}) {
  const byKey = new Map(aggregates.map((a) => [`${a.N}|${a.subregion}|${a.rule}`, a]));
  const counts = [...new Set(aggregates.map((a) => a.N))].sort((a, b) => a - b);
  const subregions = Object.keys(subregionLabels);
  return (
    <div className="overflow-x-auto">
      <table className="w-full border-collapse text-sm" data-testid="aggregate-table">
        <thead>
          <tr>
            <th className={th}>N</th>
            <th className={th}>subregion</th>
            <th className={th}>seeds</th>
            <th className={th}>⟨n⟩</th>
            {rules.map((r) => (
              <th key={r} className={th} colSpan={2}>
                ⟨S⟩ ± SE, {ruleLabels[r] ?? r}
              </th>
            ))}
          </tr>
        </thead>
        <tbody>
          {counts.flatMap((N) =>
            subregions.map((s) => {
              const cells = rules.map((r) => byKey.get(`${N}|${s}|${r}`));
              const any = cells.find((c) => c !== undefined);
              if (!any) return null;
              return (
                <tr key={`${N}-${s}`}>
                  <td className={td}>
                    <Figure value={N} whole={5} fraction={0} />
                  </td>
                  <td className={`${td} font-mono text-xs`}>{subregionLabels[s]}</td>
                  <td className={td}>
                    <Figure value={any.seeds} whole={3} fraction={0} />
                  </td>
                  <td className={td}>
                    <Figure value={any.meanN} digits={4} whole={5} fraction={3} />
                  </td>
                  {cells.map((c, k) => [
                    <td key={`m${k}`} className={`${td} pr-0`}>
                      <Figure value={c?.meanS} digits={4} whole={4} fraction={5} />
                    </td>,
                    <td key={`e${k}`} className={`${td} pl-1 text-ink-soft`}>
                      {c?.seS != null ? (
                        <span className="figures text-xs">± {c.seS.toPrecision(2)}</span>
                      ) : (
                        <span className="text-xs text-ink-faint">one seed</span>
                      )}
                    </td>,
                  ])}
                </tr>
              );
            }),
          )}
        </tbody>
      </table>
    </div>
  );
}

/** Fitted coefficients: b of S = b ln √n + c and a of S = a n + c′, per rule, over all points and per subregion. */
export function FitsTable({
  fits,
  ruleLabels,
  subregionLabels,
}: {
  fits: StudyFit[];
  ruleLabels: Record<string, string>;
  subregionLabels: Record<string, string>;
}) {
  const logFits = fits.filter((f) => f.model === 'log');
  return (
    <div className="overflow-x-auto">
      <table className="w-full border-collapse text-sm" data-testid="fits-table">
        <thead>
          <tr>
            <th className={th}>rule</th>
            <th className={th}>points</th>
            <th className={th} colSpan={2}>b (S vs ln √n)</th>
            <th className={th}>c</th>
            <th className={th}>R²</th>
            <th className={th} colSpan={2}>a (S vs n)</th>
            <th className={th}>weights</th>
          </tr>
        </thead>
        <tbody>
          {logFits.map((f) => {
            const linear = fits.find((g) => g.model === 'linear' && g.rule === f.rule && g.subregion === f.subregion);
            return (
              <tr key={`${f.rule}-${f.subregion ?? 'all'}`}>
                <td className={td}>
                  {ruleLabels[f.rule] ?? f.rule}
                  <span className="ml-2 font-mono text-xs text-ink-faint">{f.subregion === null ? 'all points' : subregionLabels[f.subregion]}</span>
                </td>
                <td className={td}>
                  <Figure value={f.points} whole={3} fraction={0} />
                </td>
                <td className={`${td} pr-0`}>
                  <Figure value={f.slope} digits={3} whole={3} fraction={5} />
                </td>
                <td className={`${td} pl-1 text-ink-soft`}>
                  <span className="figures text-xs">{f.slopeError !== null ? `± ${f.slopeError.toPrecision(2)}` : ''}</span>
                </td>
                <td className={td}>
                  <Figure value={f.intercept} digits={3} whole={3} fraction={5} />
                </td>
                <td className={td}>
                  <Figure value={f.rSquared} digits={3} whole={2} fraction={5} />
                </td>
                <td className={`${td} pr-0`}>
                  <Figure value={linear?.slope} digits={3} whole={3} fraction={7} />
                </td>
                <td className={`${td} pl-1 text-ink-soft`}>
                  <span className="figures text-xs">{linear?.slopeError != null ? `± ${linear.slopeError.toPrecision(2)}` : ''}</span>
                </td>
                <td className={`${td} text-xs text-ink-faint`}>{f.weighting === 'inverse-variance' ? '1/SE²' : 'equal'}</td>
              </tr>
            );
          })}
        </tbody>
      </table>
      <p className="mt-2 text-xs text-ink-faint">
        Weighted least squares on the ensemble means (weights 1/SE², equal when a mean rests on one seed). The continuum value
        for one free boson is b = 1/3 (Calabrese–Cardy 2004); causal sets approach it with double truncation (Sorkin–Yazdi 2018).
      </p>
    </div>
  );
}
