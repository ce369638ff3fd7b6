import { useState, type FormEvent } from 'react';
import { extendStudyRequestSchema, nextSeeds, STUDY_MAX_CELLS, type StudyDetail } from '@shared/studies';
import { isApiError } from '../../../lib/apiClient';
import { validate } from '../../../lib/forms';
import { Button } from '../../../ui/Button';
import { FormError, TextField } from '../../../ui/Field';
import { useExtendStudy } from '../api/studies';
import { parseNumberList } from '../lib/studyForm';

/**
 * More N values and more seeds for a study over sprinklings: the grid grows to every (N, seed) of the
 * old and new values together, the cells it lacks are queued, and the tables and fits take them in as
 * they finish. New seeds continue the study's numbering.
 */
export function ExtendStudyForm({ study }: { study: StudyDetail }) {
  const [counts, setCounts] = useState('');
  const [seedCount, setSeedCount] = useState('');
  const [errors, setErrors] = useState<Record<string, string>>({});
  const [formError, setFormError] = useState<string | null>(null);
  const [added, setAdded] = useState<number | null>(null);
  const extend = useExtendStudy(study.id);
  const seeds = ((study.request ?? {}) as { seeds?: string[] }).seeds ?? [];
  const more = Math.max(0, Math.floor(Number(seedCount) || 0));
  const newCounts = parseNumberList(counts).filter(Number.isFinite).length;
  const total = (study.counts.length + newCounts) * (seeds.length + more);

  async function submit(event: FormEvent) {
    event.preventDefault();
    setFormError(null);
    setAdded(null);
    const body = { counts: parseNumberList(counts), ...(seedCount.trim() !== '' ? { seedCount: Number(seedCount) } : {}) };
    const checked = validate(extendStudyRequestSchema, body);
    if (!checked.ok) {
      setErrors(Object.fromEntries(Object.entries(checked.errors).map(([path, message]) => [path.startsWith('seed') ? 'seedCount' : 'counts', message])));
      return;
    }
    setErrors({});
    try {
      const { cellIds } = await extend.mutateAsync(body);
      setAdded(cellIds.length);
      setCounts('');
      setSeedCount('');
    } catch (error) {
      if (isApiError(error) && error.issues.length > 0) {
        setErrors(Object.fromEntries(error.issues.map((i) => [i.path.startsWith('seed') ? 'seedCount' : 'counts', i.message])));
      }
      setFormError(error instanceof Error ? error.message : 'The study could not be extended.');
    }
  }

  return (
    <form onSubmit={submit} noValidate className="flex max-w-2xl flex-col gap-4" data-testid="extend-study">
      <div className="grid grid-cols-1 gap-6 sm:grid-cols-2">
        <TextField label="More N values" name="extendCounts" className="font-mono" value={counts} onChange={(e) => setCounts(e.target.value)} error={errors.counts} placeholder="e.g. 960, 1920" hint={`now ${study.counts.join(', ')}`} />
        <TextField
          label="More seeds per N"
          name="extendSeeds"
          inputMode="numeric"
          value={seedCount}
          onChange={(e) => setSeedCount(e.target.value)}
          error={errors.seedCount}
          hint={more > 0 ? `adds ${nextSeeds(seeds, Math.min(more, 64)).slice(0, 3).join(', ')}${more > 3 ? ', …' : ''}` : `now ${seeds.length}`}
        />
      </div>
      <p className="text-xs text-ink-soft">
        The grown study has <span className="figures">{total}</span> sprinkling{total === 1 ? '' : 's'} (at most {STUDY_MAX_CELLS}); the ones already computed stay as they are.
      </p>
      <FormError message={formError} />
      <div className="flex items-baseline gap-4">
        <Button type="submit" busy={extend.isPending}>
          Extend study
        </Button>
        {added !== null && (
          <span className="text-sm text-ink-soft" role="status">
            {added} sprinkling{added === 1 ? '' : 's'} queued.
          </span>
        )}
      </div>
    </form>
  );
}
