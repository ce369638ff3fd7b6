import { useState, type FormEvent } from 'react';
import { updateMeRequestSchema } from '@shared/auth';
import { roleLabels } from '../../../lib/format';
import { validate, useFormErrors } from '../../../lib/forms';
import { Button } from '../../../ui/Button';
import { FormError, TextField } from '../../../ui/Field';
import { PageHeader, Section } from '../../../ui/Page';
import { Loading } from '../../../ui/States';
import { useMe } from '../../../lib/currentUser';
import { useUpdateMe } from '../api/account';
import { ApiTokensSection } from '../components/ApiTokensSection';
import { Switch } from '../components/Switch';

export function AccountPage() {
  const me = useMe();
  if (!me.data) return <Loading />;
  const { user, memberships } = me.data;

  return (
    <>
      <PageHeader title="Account" context={<span>Signed in as {user.email}</span>} />
      <Section title="Name">
        <NameForm currentName={user.name} />
      </Section>
      <Section title="Notifications">
        <NotificationSwitches runs={user.notifyOnRunDone} studies={user.notifyOnStudyDone} />
      </Section>
      <Section title="Teams">
        <ul className="text-sm">
          {memberships.map((membership) => (
            <li key={membership.team.id} className="flex justify-between border-b border-rule py-2">
              <span>{membership.team.name}</span>
              <span className="text-ink-soft">{roleLabels[membership.role]}</span>
            </li>
          ))}
        </ul>
      </Section>
      <Section title="API tokens">
        <ApiTokensSection memberships={memberships} />
      </Section>
    </>
  );
}

function NameForm({ currentName }: { currentName: string }) {
  const [name, setName] = useState(currentName);
  const [saved, setSaved] = useState(false);
  const errors = useFormErrors();
  const updateMe = useUpdateMe();

  function submit(event: FormEvent) {
    event.preventDefault();
    errors.clear();
    setSaved(false);
    const checked = validate(updateMeRequestSchema, { name });
    if (!checked.ok) return errors.setFieldErrors(checked.errors);
    updateMe.mutate(checked.data, { onSuccess: () => setSaved(true), onError: errors.fromServer });
  }

  return (
    <form onSubmit={submit} noValidate aria-label="Change name" className="flex max-w-xl flex-col gap-3">
      <div className="flex items-end gap-4">
        <div className="flex-1">
          <TextField
            label="Shown to your team"
            name="name"
            value={name}
            onChange={(e) => {
              setName(e.target.value);
              setSaved(false);
            }}
            error={errors.fieldErrors.name}
          />
        </div>
        <Button type="submit" busy={updateMe.isPending} disabled={name.trim() === currentName}>
          Save
        </Button>
      </div>
      <FormError message={errors.formError} />
      {saved && (
        <p role="status" className="text-xs text-ink-soft">
          Saved.
        </p>
      )}
    </form>
  );
}

type NotificationKey = 'notifyOnRunDone' | 'notifyOnStudyDone';

/** One switch per kind of e-mail; while a change is on its way the switch shows the value asked for. */
function NotificationSwitches({ runs, studies }: { runs: boolean; studies: boolean }) {
  const updateMe = useUpdateMe();
  const shown = (key: NotificationKey, stored: boolean) => (updateMe.isPending && updateMe.variables?.[key] !== undefined ? updateMe.variables[key] : stored);
  return (
    <div className="flex max-w-xl flex-col gap-4">
      <Switch
        label="E-mail me when a run finishes"
        description="One message per vacuum run you started, when it completes or fails."
        checked={shown('notifyOnRunDone', runs)}
        disabled={updateMe.isPending}
        onChange={(notifyOnRunDone) => updateMe.mutate({ notifyOnRunDone })}
      />
      <Switch
        label="E-mail me when a study finishes"
        description="One message per scaling study you started, when its last cell is computed or it ends with failed cells."
        checked={shown('notifyOnStudyDone', studies)}
        disabled={updateMe.isPending}
        onChange={(notifyOnStudyDone) => updateMe.mutate({ notifyOnStudyDone })}
      />
      <FormError message={updateMe.error?.message} />
    </div>
  );
}
