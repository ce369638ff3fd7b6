import { useState } from 'react';
import type { StudyDetail } from '@shared/studies';
import { PlotFigure } from '../../../ui/PlotFigure';
import { referenceSlopeTrace, scalingTraces, spectraTraces } from '../lib/plotData';

function RuleSelect({ value, onChange, rules, labels }: { value: string; onChange(v: string): void; rules: string[]; labels: Record<string, string> }) {
  if (rules.length < 2) return null;
  return (
    <label className="flex items-baseline gap-2 text-xs text-ink-soft">
      rule
      <select value={value} onChange={(e) => onChange(e.target.value)} className="border-0 border-b border-rule bg-transparent py-0.5 text-sm text-ink focus:border-accent focus:outline-none">
        {rules.map((r) => (
          <option key={r} value={r}>
            {labels[r] ?? r}
          </option>
        ))}
      </select>
    </label>
  );
}

/** S against ln √n with error bars and the fit, S against n, and one spectrum per N. */
export function StudyPlots({ study }: { study: StudyDetail }) {
  const rules = study.rules;
  const id8 = study.id.slice(0, 8);
  const subregionLabels = Object.fromEntries(study.subregions.map((s) => [s.key, s.label]));
  const [logRule, setLogRule] = useState(rules.find((r) => r.endsWith('+double')) ?? rules[0]!);
  const [linearRule, setLinearRule] = useState(rules.find((r) => r === 'none') ?? rules[0]!);
  const logData = scalingTraces({ aggregates: study.aggregates, fits: study.fits, rule: logRule, subregionLabels, model: 'log' });
  const reference = referenceSlopeTrace(study.aggregates, logRule);
  if (reference && logRule.endsWith('+double')) logData.push(reference);
  const axisTitle = (text: string) => ({ title: { text } });
  return (
    <div className="flex flex-col gap-10">
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
      {study.spectra.length > 0 && (
        <PlotFigure
          title={study.source === 'imported' ? 'Spectra, one causal set per N' : 'Spectra, one seed per N'}
          fileName={`tacet-study-${id8}-spectra`}
          data={spectraTraces(study.spectra, new Map(study.causalSets.map((c) => [c.id, c.name])))}
          layout={{ xaxis: { type: 'log', title: { text: 'rank k' } }, yaxis: { type: 'log', exponentformat: 'power', title: { text: 'λ_k (positive eigenvalues of iΔ)' } } }}
          caption={`Positive eigenvalues of the Pauli–Jordan operator of the first finished ${study.source === 'imported' ? 'causal set' : 'seed'} per N; dashed: the whole-region cut.`}
        />
      )}
    </div>
  );
}
