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
        <NotificationSwitch enabled={user.notifyOnRunDone} />
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

function NotificationSwitch({ enabled }: { enabled: boolean }) {
  const updateMe = useUpdateMe();
  return (
    <div className="flex max-w-xl flex-col gap-2">
      <Switch
        label="E-mail me when a run finishes"
        description="One message per vacuum run or scaling study you started, when it completes or fails."
        checked={updateMe.isPending && updateMe.variables?.notifyOnRunDone !== undefined ? updateMe.variables.notifyOnRunDone : enabled}
        disabled={updateMe.isPending}
        onChange={(notifyOnRunDone) => updateMe.mutate({ notifyOnRunDone })}
      />
      <FormError message={updateMe.error?.message} />
    </div>
  );
}
