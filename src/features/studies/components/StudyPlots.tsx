import { useState } from 'react';
import type { StudyDetail } from '@shared/studies';
import { pairDecaySentence, sortRenyiKeys } from '@shared/studies';
import { renyiLabel } from '@shared/vacuum';
import { PlotFigure } from '../../../ui/PlotFigure';
import { pairDecayTraces, pairFitOf, pairSeries, referenceSlopeTrace, scalingTraces, spectraTraces } from '../lib/plotData';

function RuleSelect({ value, onChange, rules, labels, what = 'rule' }: { value: string; onChange(v: string): void; rules: string[]; labels: Record<string, string>; what?: string }) {
  if (rules.length < 2) return null;
  return (
    <label className="flex min-w-0 max-w-full items-baseline gap-2 text-xs text-ink-soft">
      {what}
      <select value={value} onChange={(e) => onChange(e.target.value)} className="min-w-0 max-w-full truncate border-0 border-b border-rule bg-transparent py-0.5 text-sm text-ink focus:border-accent focus:outline-none">
        {rules.map((r) => (
          <option key={r} value={r}>
            {labels[r] ?? r}
          </option>
        ))}
      </select>
    </label>
  );
}

const axisTitle = (text: string) => ({ title: { text } });

/**
 * ⟨I⟩ against d/T on log-log axes with the fits and the continuum trend's slope, and beside it the
 * measured agreement in words and the cautions a difference of large numbers needs.
 */
function PairDecayPlot({ study, rule, onRule }: { study: StudyDetail; rule: string; onRule(rule: string): void }) {
  const id8 = study.id.slice(0, 8);
  const series = pairSeries(study.aggregates, rule);
  const left = series.reduce((sum, s) => sum + s.rows.filter((r) => r.pair!.meanI <= 0).length, 0);
  return (
    <div className="flex flex-col gap-2">
      <RuleSelect value={rule} onChange={onRule} rules={study.rules} labels={study.ruleLabels} />
      <div className="grid grid-cols-1 gap-6 lg:grid-cols-[minmax(0,1fr)_18rem]">
        <PlotFigure
          title="Mutual information against separation"
          fileName={`tacet-study-${id8}-I-vs-d`}
          data={pairDecayTraces(study.aggregates, study.fits, rule)}
          height={480}
          layout={{
            xaxis: { type: 'log', title: { text: 'd/T (gap between the sub-diamonds)' } },
            yaxis: { type: 'log', exponentformat: 'power', title: { text: '⟨I⟩' } },
            // below the plot, so the axes keep the width on a phone
            legend: { orientation: 'h', x: 0, y: -0.18, yanchor: 'top', bgcolor: 'rgba(0,0,0,0)' },
            margin: { l: 56, r: 16, t: 16, b: 44 },
          }}
          caption={`${study.ruleLabels[rule] ?? rule}: ensemble means of I = S_A + S_B − S_A∪B with standard errors, one series per ℓ/T and N${left ? ` (${left} mean${left === 1 ? '' : 's'} ≤ 0 cannot be drawn on log axes and ${left === 1 ? 'is' : 'are'} left out of the fits)` : ''}; dashed: weighted log-log fits; green: the continuum two-interval trend of a c = 1 vacuum, drawn with its own log-log slope through the middle of each fit — a comparison of slopes, not of values.`}
        />
        <aside className="flex flex-col gap-3 text-sm text-ink-soft" data-testid="pair-agreement">
          <p className="font-medium text-ink">Measured against the continuum trend</p>
          {series.map(({ size, N }) => {
            const fit = pairFitOf(study.fits, rule, size, N);
            return (
              <p key={`${size}-${N}`}>
                <span className="font-mono text-xs text-ink">ℓ/T = {size}, N = {N}:</span>{' '}
                {fit ? `${pairDecaySentence(fit)}.` : 'no fit: it needs three separations with ⟨I⟩ > 0.'}
              </p>
            );
          })}
          <p className="border-l-2 border-reference pl-3 text-xs">
            The trend (1/3) ln[(ℓ+d)²/(d(2ℓ+d))] is exact for a free Dirac fermion and only a trend for the boson
            (Calabrese–Cardy 2004; Casini–Huerta 2009); each sub-diamond stands for its base interval. Finite-size effects are
            large here: the sub-diamonds hold few elements. I is a difference of large numbers, so its relative error far exceeds
            that of S. The truncation is a modelling choice, and with double truncation A, B and A∪B each get their own cut.
          </p>
        </aside>
      </div>
    </div>
  );
}

/** S_α against ln √n for one order and rule, with the fits: the same plot as S, per α. */
function RenyiPlot({ study, renyiKeys }: { study: StudyDetail; renyiKeys: string[] }) {
  const id8 = study.id.slice(0, 8);
  const subregionLabels = Object.fromEntries(study.subregions.map((s) => [s.key, s.label]));
  const [rule, setRule] = useState(study.rules.find((r) => r.endsWith('+double')) ?? study.rules[0]!);
  const [order, setOrder] = useState(renyiKeys[0]!);
  const orderLabels = Object.fromEntries(renyiKeys.map((k) => [k, renyiLabel(k)]));
  return (
    <div className="flex flex-col gap-2">
      <div className="flex flex-wrap gap-x-6 gap-y-2">
        <RuleSelect value={order} onChange={setOrder} rules={renyiKeys} labels={orderLabels} what="order" />
        <RuleSelect value={rule} onChange={setRule} rules={study.rules} labels={study.ruleLabels} />
      </div>
      <PlotFigure
        title={`Rényi entropy ${renyiLabel(order)} against ln √n`}
        fileName={`tacet-study-${id8}-renyi-${order}-vs-ln-sqrt-n`}
        data={scalingTraces({ aggregates: study.aggregates, fits: study.fits, rule, subregionLabels, model: 'log', quantity: order })}
        layout={{ xaxis: axisTitle('ln √n'), yaxis: axisTitle(renyiLabel(order)) }}
        caption={`${study.ruleLabels[rule] ?? rule}: ensemble means of ${renyiLabel(order)} from the same generalised eigenvalues as S, with standard errors; dashed: weighted fits across N, one per subregion.`}
      />
    </div>
  );
}

/**
 * S against ln √n with error bars and the fit, S against n, S_α against ln √n when the study has Rényi
 * orders, ⟨I⟩ against d/T for pairs, and one spectrum per N.
 */
export function StudyPlots({ study }: { study: StudyDetail }) {
  const rules = study.rules;
  const id8 = study.id.slice(0, 8);
  const subregionLabels = Object.fromEntries(study.subregions.map((s) => [s.key, s.label]));
  const [logRule, setLogRule] = useState(rules.find((r) => r.endsWith('+double')) ?? rules[0]!);
  const [linearRule, setLinearRule] = useState(rules.find((r) => r === 'none') ?? rules[0]!);
  const [pairRule, setPairRule] = useState(rules.find((r) => r === 'none') ?? rules[0]!);
  const pairs = study.aggregates.some((a) => a.pair);
  const singles = study.aggregates.some((a) => !a.pair);
  const renyiKeys = sortRenyiKeys(study.aggregates.filter((a) => !a.pair).flatMap((a) => Object.keys(a.renyi ?? {})));
  const logData = scalingTraces({ aggregates: study.aggregates, fits: study.fits, rule: logRule, subregionLabels, model: 'log' });
  const reference = referenceSlopeTrace(study.aggregates, logRule);
  if (reference && logRule.endsWith('+double')) logData.push(reference);
  return (
    <div className="flex flex-col gap-10">
      {pairs && <PairDecayPlot study={study} rule={pairRule} onRule={setPairRule} />}
      {singles && (
      <>
      <div className="flex flex-col gap-2">
        <RuleSelect value={logRule} onChange={setLogRule} rules={rules} labels={study.ruleLabels} />
        <PlotFigure
          title="Entropy against ln √n"
          fileName={`tacet-study-${id8}-S-vs-ln-sqrt-n`}
          data={logData}
          layout={{ xaxis: axisTitle('ln √n'), yaxis: axisTitle('S') }}
          caption={`${study.ruleLabels[logRule] ?? logRule}: ensemble means with standard errors; dashed: weighted fits across N, one per subregion.`}
        />
      </div>
      <div className="flex flex-col gap-2">
        <RuleSelect value={linearRule} onChange={setLinearRule} rules={rules} labels={study.ruleLabels} />
        <PlotFigure
          title="Entropy against n"
          fileName={`tacet-study-${id8}-S-vs-n`}
          data={scalingTraces({ aggregates: study.aggregates, fits: study.fits, rule: linearRule, subregionLabels, model: 'linear' })}
          layout={{ xaxis: axisTitle('n (elements in the subregion)'), yaxis: axisTitle('S') }}
          caption={`${study.ruleLabels[linearRule] ?? linearRule}: a straight line here is the spacetime volume law.`}
        />
      </div>
      {renyiKeys.length > 0 && <RenyiPlot study={study} renyiKeys={renyiKeys} />}
      </>
      )}
      {study.spectra.length > 0 && (
        <PlotFigure
          title={study.source === 'imported' ? 'Spectra, one causal set per N' : 'Spectra, one seed per N'}
          fileName={`tacet-study-${id8}-spectra`}
          data={spectraTraces(study.spectra, new Map(study.causalSets.map((c) => [c.id, c.name])), study.ruleLabels)}
          layout={{ xaxis: { type: 'log', title: { text: 'rank k' } }, yaxis: { type: 'log', exponentformat: 'power', title: { text: 'λ_k (positive eigenvalues of iΔ)' } } }}
          caption={`Positive eigenvalues of the Pauli–Jordan operator of the first finished ${study.source === 'imported' ? 'causal set' : 'seed'} per N; dashed: the whole-region cut.`}
        />
      )}
    </div>
  );
}
