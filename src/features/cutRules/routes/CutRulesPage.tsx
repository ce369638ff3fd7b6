import { useState, type FormEvent } from 'react';
import { createCutRuleRequestSchema, type CutRule } from '@shared/runs';
import { formatDate } from '../../../lib/format';
import { useFormErrors, validate } from '../../../lib/forms';
import { Button } from '../../../ui/Button';
import { FormError, TextField } from '../../../ui/Field';
import { PageHeader, Section } from '../../../ui/Page';
import { Empty, ErrorState, Loading } from '../../../ui/States';
import { useCan } from '../../../lib/permissions';
import { useCreateCutRule, useCutRules, useDeleteCutRule } from '../api/cutRules';
import { TruncationRuleFields } from '../../../ui/TruncationRuleFields';
import {
  defaultTruncation,
  describeTruncation,
  truncationFieldMessages,
  truncationFromForm,
  type TruncationFormValues,
} from '../../../lib/truncationForm';

export function CutRulesPage() {
  const cutRules = useCutRules();
  const canCompute = useCan('compute');

  return (
    <>
      <PageHeader
        title="Cut rules"
        context="Truncation rules saved by name for the whole team, to pick in the run form. Which rule is right is a modelling choice; naming it keeps runs comparable."
      />
      {canCompute && (
        <Section title="New cut rule">
          <CutRuleForm />
        </Section>
      )}
      <Section title="Saved" aside={cutRules.data && <span className="figures">{cutRules.data.length}</span>}>
        {cutRules.isPending ? (
          <Loading label="Loading cut rules" />
        ) : cutRules.isError ? (
          <ErrorState error={cutRules.error} onRetry={() => cutRules.refetch()} />
        ) : cutRules.data.length === 0 ? (
          <Empty>No cut rules saved yet.{canCompute ? ' Save one above.' : ''}</Empty>
        ) : (
          <div className="overflow-x-auto">
            <table className="w-full border-collapse text-sm" aria-label="Cut rules">
              <thead>
                <tr className="border-b border-ink/70 text-left text-xs text-ink-faint">
                  <th className="py-2 pr-4 font-normal">Name</th>
                  <th className="py-2 pr-4 font-normal">Rule</th>
                  <th className="py-2 pr-4 font-normal">Note</th>
                  <th className="py-2 pr-4 font-normal">Saved by</th>
                  <th className="py-2 pr-4 text-right font-normal">Date</th>
                  {canCompute && (
                    <th className="py-2 font-normal">
                      <span className="sr-only">Actions</span>
                    </th>
                  )}
                </tr>
              </thead>
              <tbody>
                {cutRules.data.map((rule) => (
                  <CutRuleRow key={rule.id} rule={rule} canDelete={canCompute} />
                ))}
              </tbody>
            </table>
          </div>
        )}
      </Section>
    </>
  );
}

function CutRuleRow({ rule, canDelete }: { rule: CutRule; canDelete: boolean }) {
  const remove = useDeleteCutRule();
  const [confirming, setConfirming] = useState(false);
  return (
    <>
      <tr className="border-b border-rule align-baseline">
        <td className="py-2.5 pr-4 text-ink">{rule.name}</td>
        <td className="figures py-2.5 pr-4">{describeTruncation(rule.rule)}</td>
        <td className="py-2.5 pr-4 text-ink-soft">{rule.note ?? ''}</td>
        <td className="py-2.5 pr-4 text-ink-soft">{rule.createdBy.name}</td>
        <td className="figures py-2.5 pr-4 text-right text-ink-soft">{formatDate(rule.createdAt)}</td>
        {canDelete && (
          <td className="py-2.5 text-right whitespace-nowrap">
            {confirming ? (
              <span className="inline-flex items-baseline gap-2">
                <Button variant="danger" busy={remove.isPending} onClick={() => remove.mutate(rule.id)}>
                  Delete
                </Button>
                <Button variant="quiet" onClick={() => setConfirming(false)}>
                  Keep
                </Button>
              </span>
            ) : (
              <Button variant="quiet" className="text-ink-soft" onClick={() => setConfirming(true)}>
                Delete
              </Button>
            )}
          </td>
        )}
      </tr>
      {remove.error && (
        <tr>
          <td colSpan={6} role="alert" className="py-1.5 text-xs text-danger">
            {remove.error.message}
          </td>
        </tr>
      )}
    </>
  );
}

function CutRuleForm() {
  const [name, setName] = useState('');
  const [note, setNote] = useState('');
  const [truncation, setTruncation] = useState<TruncationFormValues>({ ...defaultTruncation });
  const [saved, setSaved] = useState<string | null>(null);
  const errors = useFormErrors();
  const create = useCreateCutRule();

  function submit(event: FormEvent) {
    event.preventDefault();
    errors.clear();
    setSaved(null);
    const checked = validate(createCutRuleRequestSchema, {
      name,
      rule: truncationFromForm(truncation),
      ...(note.trim() ? { note } : {}),
    });
    if (!checked.ok) {
      // The rule's fields are keyed like the run form's (truncation.*).
      const byField: Record<string, string> = {};
      for (const [path, message] of Object.entries(checked.errors)) {
        const field = path.replace(/^rule/, 'truncation');
        byField[field] = truncationFieldMessages[field] ?? message;
      }
      if (byField.name) byField.name = 'Give the rule a name (up to 80 characters).';
      return errors.setFieldErrors(byField);
    }
    create.mutate(checked.data, {
      onSuccess: (rule) => {
        setSaved(rule.name);
        setName('');
        setNote('');
      },
      onError: errors.fromServer,
    });
  }

  return (
    <form onSubmit={submit} noValidate aria-label="New cut rule" className="flex max-w-3xl flex-col gap-6">
      <div className="grid grid-cols-1 gap-6 sm:grid-cols-2">
        <TextField label="Name" name="cutRuleName" value={name} onChange={(e) => setName(e.target.value)} error={errors.fieldErrors.name} maxLength={80} />
        <TextField
          label="Note"
          name="cutRuleNote"
          value={note}
          onChange={(e) => setNote(e.target.value)}
          error={errors.fieldErrors.note}
          hint="Optional: where the rule comes from, when to use it."
          maxLength={500}
        />
      </div>
      <TruncationRuleFields value={truncation} onChange={setTruncation} errors={errors.fieldErrors} />
      <FormError message={errors.formError} />
      <div className="flex items-baseline gap-4">
        <Button type="submit" busy={create.isPending}>
          Save cut rule
        </Button>
        {saved && (
          <span role="status" className="text-sm text-ink-soft">
            Saved “{saved}”.
          </span>
        )}
      </div>
    </form>
  );
}
