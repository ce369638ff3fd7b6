import { useState, type FormEvent } from 'react';
import { renameTeamRequestSchema } from '@shared/teams';
import { validate, useFormErrors } from '../../../lib/forms';
import { Button } from '../../../ui/Button';
import { FormError, TextField } from '../../../ui/Field';
import { useRenameTeam } from '../api/team';

export function RenameTeamForm({ currentName, onDone }: { currentName: string; onDone: () => void }) {
  const [name, setName] = useState(currentName);
  const errors = useFormErrors();
  const rename = useRenameTeam();

  function submit(event: FormEvent) {
    event.preventDefault();
    errors.clear();
    const checked = validate(renameTeamRequestSchema, { name });
    if (!checked.ok) return errors.setFieldErrors(checked.errors);
    rename.mutate(checked.data, { onSuccess: onDone, onError: errors.fromServer });
  }

  return (
    <form onSubmit={submit} noValidate aria-label="Rename team" className="flex max-w-xl flex-col gap-3">
      <div className="flex items-end gap-4">
        <div className="flex-1">
          <TextField label="Team name" name="teamName" value={name} onChange={(e) => setName(e.target.value)} error={errors.fieldErrors.name} autoFocus />
        </div>
        <Button type="submit" busy={rename.isPending}>
          Save
        </Button>
        <Button variant="quiet" onClick={onDone}>
          Cancel
        </Button>
      </div>
      <FormError message={errors.formError} />
    </form>
  );
}
