import { useState, type FormEvent } from 'react';
import { Link } from 'react-router';
import { roles, type Role } from '@shared/roles';
import { createInvitationRequestSchema } from '@shared/teams';
import { roleLabels } from '../../../lib/format';
import { validate, useFormErrors } from '../../../lib/forms';
import { Button } from '../../../ui/Button';
import { FormError, SelectField, TextField } from '../../../ui/Field';
import { useCreateInvitation } from '../api/team';

export function InviteForm() {
  const [email, setEmail] = useState('');
  const [role, setRole] = useState<Role>('researcher');
  const [sentTo, setSentTo] = useState<string | null>(null);
  const errors = useFormErrors();
  const createInvitation = useCreateInvitation();

  function submit(event: FormEvent) {
    event.preventDefault();
    errors.clear();
    setSentTo(null);
    const checked = validate(createInvitationRequestSchema, { email, role });
    if (!checked.ok) return errors.setFieldErrors(checked.errors);
    createInvitation.mutate(checked.data, {
      onSuccess: (invitation) => {
        setSentTo(invitation.email);
        setEmail('');
      },
      onError: errors.fromServer,
    });
  }

  return (
    <form onSubmit={submit} noValidate aria-label="Invite someone" className="flex flex-col gap-4">
      <div className="grid grid-cols-1 items-end gap-6 sm:grid-cols-[1fr_12rem_auto]">
        <TextField
          label="E-mail of the person to invite"
          type="email"
          name="inviteEmail"
          value={email}
          onChange={(e) => setEmail(e.target.value)}
          error={errors.fieldErrors.email}
        />
        <SelectField
          label="Role"
          name="inviteRole"
          value={role}
          onChange={(e) => setRole(e.target.value as Role)}
          error={errors.fieldErrors.role}
        >
          {roles.map((r) => (
            <option key={r} value={r}>
              {roleLabels[r]}
            </option>
          ))}
        </SelectField>
        <div className="pb-0.5">
          <Button type="submit" busy={createInvitation.isPending}>
            Send invitation
          </Button>
        </div>
      </div>
      <FormError message={errors.formError} />
      {sentTo && (
        <p role="status" className="text-sm text-ink-soft">
          Invitation sent to <span className="text-ink">{sentTo}</span>; its link is valid for 7 days. On a
          development server the message can be read in the{' '}
          <Link to="/outbox" className="text-accent hover:underline">
            outbox
          </Link>
          .
        </p>
      )}
    </form>
  );
}
