import { useState, type FormEvent } from 'react';
import { signupRequestSchema } from '@shared/auth';
import { validate, useFormErrors } from '../../../lib/forms';
import { Button } from '../../../ui/Button';
import { FormError, TextField } from '../../../ui/Field';
import { useSignUp } from '../api/session';

interface SignUpFormProps {
  /** Joining through an invitation: the e-mail is the invited one and no team is created. */
  invitation?: { token: string; email: string };
  onSignedUp: () => void;
}

export function SignUpForm({ invitation, onSignedUp }: SignUpFormProps) {
  const [name, setName] = useState('');
  const [email, setEmail] = useState(invitation?.email ?? '');
  const [password, setPassword] = useState('');
  const [teamName, setTeamName] = useState('');
  const errors = useFormErrors();
  const signUp = useSignUp();

  function submit(event: FormEvent) {
    event.preventDefault();
    errors.clear();
    const values = invitation
      ? { name, email, password, invitationToken: invitation.token }
      : { name, email, password, ...(teamName.trim() ? { teamName } : {}) };
    const checked = validate(signupRequestSchema, values);
    if (!checked.ok) return errors.setFieldErrors(checked.errors);
    signUp.mutate(checked.data, { onSuccess: onSignedUp, onError: errors.fromServer });
  }

  return (
    <form onSubmit={submit} noValidate className="flex flex-col gap-6" aria-label="Create account">
      <TextField
        label="Your name"
        name="name"
        autoComplete="name"
        value={name}
        onChange={(e) => setName(e.target.value)}
        error={errors.fieldErrors.name}
        autoFocus
      />
      <TextField
        label="E-mail"
        type="email"
        name="email"
        autoComplete="email"
        value={email}
        readOnly={Boolean(invitation)}
        onChange={(e) => setEmail(e.target.value)}
        error={errors.fieldErrors.email}
        hint={invitation ? 'The address the invitation was sent to.' : undefined}
      />
      <TextField
        label="Password"
        type="password"
        name="password"
        autoComplete="new-password"
        value={password}
        onChange={(e) => setPassword(e.target.value)}
        error={errors.fieldErrors.password}
        hint="At least 10 characters, with a letter and a digit or symbol."
      />
      {!invitation && (
        <TextField
          label="Team name (optional)"
          name="teamName"
          value={teamName}
          onChange={(e) => setTeamName(e.target.value)}
          error={errors.fieldErrors.teamName}
          placeholder={name.trim() ? `${name.trim()}'s team` : 'Your name’s team'}
          hint="You become its owner and can invite others."
        />
      )}
      <FormError message={errors.formError ?? errors.fieldErrors.invitationToken} />
      <div>
        <Button type="submit" busy={signUp.isPending}>
          {invitation ? 'Create account and join' : 'Create account'}
        </Button>
      </div>
    </form>
  );
}
