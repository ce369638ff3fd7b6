import { useState, type FormEvent } from 'react';
import { Link } from 'react-router';
import { loginRequestSchema } from '@shared/auth';
import { validate, useFormErrors } from '../../../lib/forms';
import { Button } from '../../../ui/Button';
import { FormError, TextField } from '../../../ui/Field';
import { useSignIn } from '../api/session';

export function SignInForm({ initialEmail = '', onSignedIn }: { initialEmail?: string; onSignedIn: () => void }) {
  const [email, setEmail] = useState(initialEmail);
  const [password, setPassword] = useState('');
  const errors = useFormErrors();
  const signIn = useSignIn();

  function submit(event: FormEvent) {
    event.preventDefault();
    errors.clear();
    const checked = validate(loginRequestSchema, { email, password });
    if (!checked.ok) return errors.setFieldErrors(checked.errors);
    signIn.mutate(checked.data, { onSuccess: onSignedIn, onError: errors.fromServer });
  }

  return (
    <form onSubmit={submit} noValidate className="flex flex-col gap-6" aria-label="Sign in">
      <TextField
        label="E-mail"
        type="email"
        name="email"
        autoComplete="username"
        value={email}
        onChange={(e) => setEmail(e.target.value)}
        error={errors.fieldErrors.email}
        autoFocus={!initialEmail}
      />
      <TextField
        label="Password"
        type="password"
        name="password"
        autoComplete="current-password"
        value={password}
        onChange={(e) => setPassword(e.target.value)}
        error={errors.fieldErrors.password}
        autoFocus={Boolean(initialEmail)}
        hint={
          <Link to="/reset-password" className="text-accent hover:underline">
            Forgot your password?
          </Link>
        }
      />
      <FormError message={errors.formError} />
      <div>
        <Button type="submit" busy={signIn.isPending}>
          Sign in
        </Button>
      </div>
    </form>
  );
}
