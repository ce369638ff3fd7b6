import { formatSignificantDigits, splitWithError } from '@shared/precision';
import type { StudyAggregate, StudyFit } from '@shared/studies';
import { fitQuantity, renyiQuantity, sortRenyiKeys } from '@shared/studies';
import { renyiLabel } from '@shared/vacuum';
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
                      <Figure value={c?.meanS} error={c?.seS} digits={4} whole={4} fraction={5} />
                    </td>,
                    <td key={`e${k}`} className={`${td} pl-1 text-ink-soft`}>
                      {c?.seS != null ? (
                        <span className="figures text-xs">± {c.meanS != null ? splitWithError(c.meanS, c.seS).error : formatSignificantDigits(c.seS, 2)}</span>
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

/** ± SE beside a mean, at the decimal place the mean is shown to (shared/precision.ts), or "one seed" when there is none. */
function ErrorCell({ value, se }: { value: number | null | undefined; se: number | null | undefined }) {
  return (
    <td className={`${td} pl-1 text-ink-soft`}>
      {se != null ? <span className="figures text-xs">± {errorText(value, se)}</span> : <span className="text-xs text-ink-faint">one seed</span>}
    </td>
  );
}

/** The error of a value as formatWithError writes it beside the value. */
function errorText(value: number | null | undefined, error: number): string {
  return value != null && error > 0 ? splitWithError(value, error).error : formatSignificantDigits(error, 2);
}

/**
 * ⟨S_α⟩ ± SE of every Rényi order, one row per (N, subregion, rule), from the same μ as ⟨S⟩; for a
 * study of pairs the Rényi mutual information ⟨I_α⟩ = ⟨S_α(A) + S_α(B) − S_α(A∪B)⟩ beside ⟨I⟩.
 */
export function RenyiTable({
  aggregates,
  ruleLabels,
  subregionLabels,
}: {
  aggregates: StudyAggregate[];
  ruleLabels: Record<string, string>;
  subregionLabels: Record<string, string>;
}) {
  const pairs = aggregates.some((a) => a.pair);
  const valuesOf = (a: StudyAggregate) => (pairs ? a.pair?.renyiI : a.renyi);
  const rows = aggregates.filter((a) => valuesOf(a) && Boolean(a.pair) === pairs);
  if (rows.length === 0) return null;
  const keys = sortRenyiKeys(Object.keys(valuesOf(rows[0]!)!));
  const symbol = (k: string) => (pairs ? `I_${k === 'inf' ? '∞' : k}` : renyiLabel(k));
  return (
    <div className="overflow-x-auto">
      <table className="w-full border-collapse text-sm" data-testid="renyi-table">
        <thead>
          <tr>
            <th className={th}>N</th>
            <th className={th}>{pairs ? 'pair' : 'subregion'}</th>
            <th className={th}>rule</th>
            <th className={th} colSpan={2}>
              {pairs ? '⟨I⟩' : '⟨S⟩'} ± SE
            </th>
            {keys.map((k) => (
              <th key={k} className={th} colSpan={2}>
                ⟨{symbol(k)}⟩ ± SE
              </th>
            ))}
          </tr>
        </thead>
        <tbody>
          {rows.map((a) => (
            <tr key={`${a.N}-${a.subregion}-${a.rule}`}>
              <td className={td}>
                <Figure value={a.N} whole={5} fraction={0} />
              </td>
              <td className={`${td} whitespace-nowrap font-mono text-xs`}>{subregionLabels[a.subregion] ?? a.subregion}</td>
              <td className={`${td} whitespace-nowrap text-xs`}>{ruleLabels[a.rule] ?? a.rule}</td>
              <td className={`${td} pr-0`}>
                <Figure value={pairs ? a.pair!.meanI : a.meanS} error={pairs ? a.pair!.seI : a.seS} digits={4} whole={4} fraction={5} />
              </td>
              <ErrorCell value={pairs ? a.pair!.meanI : a.meanS} se={pairs ? a.pair!.seI : a.seS} />
              {keys.map((k) => [
                <td key={`m${k}`} className={`${td} pr-0`}>
                  <Figure value={valuesOf(a)![k]?.mean} error={valuesOf(a)![k]?.se} digits={4} whole={4} fraction={5} />
                </td>,
                <ErrorCell key={`e${k}`} value={valuesOf(a)![k]?.mean} se={valuesOf(a)![k]?.se} />,
              ])}
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}

/** ⟨I⟩ ± SE per (N, ℓ/T, d/T), one column per rule, for a study of pairs. */
export function PairTable({ aggregates, rules, ruleLabels }: { aggregates: StudyAggregate[]; rules: string[]; ruleLabels: Record<string, string> }) {
  const pairs = aggregates.filter((a) => a.pair);
  const byKey = new Map(pairs.map((a) => [`${a.N}|${a.subregion}|${a.rule}`, a]));
  const places = [...new Map(pairs.map((a) => [`${a.N}|${a.subregion}`, a])).values()].sort(
    (p, q) => p.N - q.N || p.pair!.size - q.pair!.size || p.pair!.separation - q.pair!.separation,
  );
  return (
    <div className="overflow-x-auto">
      <table className="w-full border-collapse text-sm" data-testid="pair-table">
        <thead>
          <tr>
            <th className={th}>N</th>
            <th className={th}>ℓ/T</th>
            <th className={th}>d/T</th>
            <th className={th}>seeds</th>
            <th className={th}>⟨n_A⟩ ≈ ⟨n_B⟩</th>
            {rules.map((r) => (
              <th key={r} className={th} colSpan={2}>
                ⟨I⟩ ± SE, {ruleLabels[r] ?? r}
              </th>
            ))}
          </tr>
        </thead>
        <tbody>
          {places.map((p) => {
            const cells = rules.map((r) => byKey.get(`${p.N}|${p.subregion}|${r}`));
            return (
              <tr key={`${p.N}-${p.subregion}`}>
                <td className={td}>
                  <Figure value={p.N} whole={5} fraction={0} />
                </td>
                <td className={`${td} figures`}>{p.pair!.size}</td>
                <td className={`${td} figures`}>{p.pair!.separation}</td>
                <td className={td}>
                  <Figure value={p.seeds} whole={3} fraction={0} />
                </td>
                <td className={td}>
                  <Figure value={p.meanN / 2} digits={4} whole={5} fraction={3} />
                </td>
                {cells.map((c, k) => [
                  <td key={`m${k}`} className={`${td} pr-0`}>
                    <Figure value={c?.pair!.meanI} error={c?.pair!.seI} digits={4} whole={3} fraction={5} />
                  </td>,
                  <ErrorCell key={`e${k}`} value={c?.pair!.meanI} se={c?.pair!.seI} />,
                ])}
              </tr>
            );
          })}
        </tbody>
      </table>
      <p className="mt-2 text-xs text-ink-faint">
        I = S_A + S_B − S_A∪B on one state; ⟨n_A⟩ ≈ ⟨n_B⟩ is half the mean size of A∪B. With double truncation each of A, B and A∪B is cut at its own √n/4π.
      </p>
    </div>
  );
}

/** The log-log fits of ⟨I⟩ against d/T per rule, ℓ/T and N, beside the continuum trend's slope over the same d/T. */
export function PairFitsTable({ fits, ruleLabels }: { fits: StudyFit[]; ruleLabels: Record<string, string> }) {
  const rows = fits.filter((f) => f.model === 'loglog');
  return (
    <div className="overflow-x-auto">
      <table className="w-full border-collapse text-sm" data-testid="pair-fits-table">
        <thead>
          <tr>
            <th className={th}>rule</th>
            <th className={th}>ℓ/T</th>
            <th className={th}>N</th>
            <th className={th}>points</th>
            <th className={th} colSpan={2}>slope of ln ⟨I⟩ vs ln d</th>
            <th className={th}>continuum trend</th>
            <th className={th}>d/T range</th>
          </tr>
        </thead>
        <tbody>
          {rows.map((f) => (
            <tr key={`${f.rule}-${f.size}-${f.N}`}>
              <td className={`${td} whitespace-nowrap text-xs`}>{ruleLabels[f.rule] ?? f.rule}</td>
              <td className={`${td} figures`}>{f.size}</td>
              <td className={td}>
                <Figure value={f.N} whole={5} fraction={0} />
              </td>
              <td className={`${td} text-xs`}>
                <span className="figures">{f.points}</span>
                {f.excluded ? <span className="ml-1 text-ink-faint">({f.excluded} with ⟨I⟩ ≤ 0 left out)</span> : null}
              </td>
              <td className={`${td} pr-0`}>
                <Figure value={f.slope} error={f.slopeError} kind="fit" whole={2} fraction={4} />
              </td>
              <td className={`${td} pl-1 text-ink-soft`}>
                <span className="figures text-xs">{f.slopeError !== null ? `± ${errorText(f.slope, f.slopeError)}` : ''}</span>
              </td>
              <td className={td}>
                <Figure value={f.continuum?.slope} kind="fit" whole={2} fraction={4} />
              </td>
              <td className={`${td} figures text-xs`}>{f.continuum ? `${f.continuum.from} – ${f.continuum.to}` : ''}</td>
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}

/**
 * Fitted coefficients: b of S = b ln √n + c and a of S = a n + c′, per rule, over all points and per
 * subregion; with Rényi orders also b_α of each S_α = b_α ln √n + c_α.
 */
export function FitsTable({
  fits,
  ruleLabels,
  subregionLabels,
}: {
  fits: StudyFit[];
  ruleLabels: Record<string, string>;
  subregionLabels: Record<string, string>;
}) {
  const renyiKeys = sortRenyiKeys(fits.map(fitQuantity).filter((q) => q.startsWith('renyi:')).map((q) => q.slice('renyi:'.length)));
  const logFits = fits.filter((f) => f.model === 'log' && fitQuantity(f) === 'S');
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
            {renyiKeys.map((k) => (
              <th key={k} className={th} colSpan={2}>
                b for {renyiLabel(k)}
              </th>
            ))}
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
                  <Figure value={f.slope} error={f.slopeError} kind="fit" whole={3} fraction={5} />
                </td>
                <td className={`${td} pl-1 text-ink-soft`}>
                  <span className="figures text-xs">{f.slopeError !== null ? `± ${errorText(f.slope, f.slopeError)}` : ''}</span>
                </td>
                <td className={td}>
                  <Figure value={f.intercept} error={f.interceptError} kind="fit" whole={3} fraction={5} />
                  {f.interceptError != null && <span className="figures text-xs text-ink-soft"> ± {splitWithError(f.intercept, f.interceptError).error}</span>}
                </td>
                <td className={td}>
                  <Figure value={f.rSquared} kind="fit" whole={2} fraction={5} />
                </td>
                <td className={`${td} pr-0`}>
                  <Figure value={linear?.slope} error={linear?.slopeError} kind="fit" whole={3} fraction={7} />
                </td>
                <td className={`${td} pl-1 text-ink-soft`}>
                  <span className="figures text-xs">{linear?.slopeError != null ? `± ${errorText(linear.slope, linear.slopeError)}` : ''}</span>
                </td>
                {renyiKeys.map((k) => {
                  const r = fits.find((g) => g.model === 'log' && g.rule === f.rule && g.subregion === f.subregion && fitQuantity(g) === renyiQuantity(k));
                  return [
                    <td key={`b${k}`} className={`${td} pr-0`}>
                      <Figure value={r?.slope} error={r?.slopeError} kind="fit" whole={3} fraction={5} />
                    </td>,
                    <td key={`e${k}`} className={`${td} pl-1 text-ink-soft`}>
                      <span className="figures text-xs">{r?.slopeError != null ? `± ${errorText(r.slope, r.slopeError)}` : ''}</span>
                    </td>,
                  ];
                })}
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
