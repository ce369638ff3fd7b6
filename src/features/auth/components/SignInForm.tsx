import { useState, type FormEvent } from 'react';
import { Link } from 'react-router';
import { validate, useFormErrors } from '../../../lib/forms';
import { Button } from '../../../ui/Button';
import { FormError, TextField } from '../../../ui/Field';
import { useSignIn } from '../api/session';

export function SignInForm({ initialEmail = '', onSignedIn }: { initialEmail?: string; onSignedIn: () => void }) {
  const [email, setEmail] = useState(initialEmail);
  const [password, setPassword] = useState('');
  const errors = useFormErrors();
  const signIn = useSignIn();
  const [checking, setChecking] = useState(false);

  async function submit(event: FormEvent) {
    event.preventDefault();
    if (checking || signIn.isPending) return;
    errors.clear();
    setChecking(true);
    let schemas: typeof import('@shared/auth');
    try {
      // The shared schemas, and zod with them, load at the first submit: a quarter of the script the
      // sign-in page would otherwise load before it can be shown.
      schemas = await import('@shared/auth');
    } catch (cause) {
      return errors.fromServer(cause);
    } finally {
      setChecking(false);
    }
    const checked = validate(schemas.loginRequestSchema, { email, password });
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
        <Button type="submit" busy={checking || signIn.isPending}>
          Sign in
        </Button>
      </div>
    </form>
  );
}
