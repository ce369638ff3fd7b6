import type { CutRule } from '@shared/runs';
import { defaultTruncationFor } from '@shared/vacuum';
import { truncationToForm } from '../../../lib/truncationForm';
import { Button } from '../../../ui/Button';
import { Checkbox } from '../../../ui/Checkbox';
import { RestrictedCutFields } from '../../../ui/RestrictedCutFields';
import { TruncationRuleFields } from '../../../ui/TruncationRuleFields';
import { doubleTruncatedRuleForm, studyFormMaxRules, untruncatedRuleForm, type StudyRuleFormValues } from '../lib/studyForm';

interface StudyRuleRowsProps {
  rules: StudyRuleFormValues[];
  /** an update of the rules as they are by then (a saved rule sets its id and its fields in two calls) */
  onChange(update: (rules: StudyRuleFormValues[]) => StudyRuleFormValues[]): void;
  dimension: 2 | 4;
  /** the team's saved cut rules, offered in every row */
  presets: CutRule[];
  /** messages by row (`rules.k`) and for the list as a whole (`rules`) */
  errors: Record<string, string | undefined>;
}

/** Up to four cut rules, each any truncation (a saved cut rule or one set here), singly or doubly truncated. */
export function StudyRuleRows({ rules, onChange, dimension, presets, errors }: StudyRuleRowsProps) {
  const change = (k: number, next: Partial<StudyRuleFormValues>) => onChange((now) => now.map((r, j) => (j === k ? { ...r, ...next } : r)));
  const usual = dimension === 4 ? 'the knee (√N/4π is a 2D rule)' : '√N/4π';
  return (
    <div className="flex flex-col gap-6" data-testid="study-rules">
      {rules.map((rule, k) => (
        <fieldset key={k} className="flex flex-col gap-4 border-t border-rule pt-4" data-testid={`study-rule-${k + 1}`}>
          <legend className="flex w-full items-baseline justify-between gap-4 text-sm font-medium text-ink">
            <span>Cut rule {k + 1}</span>
            {rules.length > 1 && (
              <Button variant="quiet" onClick={() => onChange((now) => now.filter((_, j) => j !== k))} aria-label={`Remove cut rule ${k + 1}`}>
                Remove
              </Button>
            )}
          </legend>
          <TruncationRuleFields
            value={rule.truncation ?? truncationToForm(defaultTruncationFor(dimension))}
            onChange={(truncation) => change(k, { truncation })}
            errors={Object.fromEntries(Object.entries(errors).filter(([key]) => key === `rules.${k}`).map(([, message]) => ['truncation', message]))}
            presets={presets}
            presetId={rule.presetId}
            onPresetChange={(presetId) => change(k, { presetId })}
          />
          {rule.truncation === null && <p className="-mt-2 text-xs text-ink-faint">Follows the region: {usual} here.</p>}
          <Checkbox
            label="Double truncation"
            hint="Sorkin–Yazdi 2018: the restricted state is cut again before the entropy; expect S ≈ b ln √n + c with b near 1/3 in 2D"
            checked={rule.doubleTruncation}
            onChange={(doubleTruncation) => change(k, { doubleTruncation })}
          />
          {rule.doubleTruncation && <RestrictedCutFields value={rule.restrictedCut} onChange={(restrictedCut) => change(k, { restrictedCut })} />}
        </fieldset>
      ))}
      {errors.rules && (
        <p className="text-xs text-danger" role="alert">
          {errors.rules}
        </p>
      )}
      <div className="flex flex-wrap items-baseline gap-4">
        <Button
          variant="quiet"
          disabled={rules.length >= studyFormMaxRules}
          onClick={() =>
            onChange((now) => (now.length >= studyFormMaxRules ? now : [...now, now.some((r) => r.doubleTruncation) ? { ...untruncatedRuleForm, truncation: { kind: 'sqrtN', value: '' } } : { ...doubleTruncatedRuleForm }]))
          }
        >
          Add a cut rule
        </Button>
        <span className="text-xs text-ink-faint">
          {rules.length} of at most {studyFormMaxRules}; each is a column of every table and a curve of every plot
        </span>
      </div>
    </div>
  );
}
