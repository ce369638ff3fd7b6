import { useState, type FormEvent } from 'react';
import { Link, useNavigate, useParams } from 'react-router';
import { passwordResetConfirmSchema } from '@shared/auth';
import { validate, useFormErrors } from '../../../lib/forms';
import { Button } from '../../../ui/Button';
import { FormError, TextField } from '../../../ui/Field';
import { useConfirmPasswordReset } from '../api/session';
import { AuthLayout } from '../components/AuthLayout';

export function ResetConfirmPage() {
  const { token = '' } = useParams();
  const navigate = useNavigate();
  const [password, setPassword] = useState('');
  const [repeated, setRepeated] = useState('');
  const errors = useFormErrors();
  const confirmReset = useConfirmPasswordReset();

  function submit(event: FormEvent) {
    event.preventDefault();
    errors.clear();
    const checked = validate(passwordResetConfirmSchema, { token, password });
    if (!checked.ok) return errors.setFieldErrors(checked.errors);
    if (password !== repeated) return errors.setFieldErrors({ repeated: 'The two passwords differ.' });
    confirmReset.mutate(checked.data, {
      onSuccess: () =>
        navigate('/signin', { replace: true, state: { notice: 'Your password is changed. Sign in with the new one.' } }),
      onError: errors.fromServer,
    });
  }

  return (
    <AuthLayout
      title="Choose a new password"
      lead="Signing in anywhere else ends once the new password is set."
      footer={
        <Link to="/reset-password" className="text-accent hover:underline">
          Ask for a new link
        </Link>
      }
    >
      <form onSubmit={submit} noValidate className="flex flex-col gap-6" aria-label="Set new password">
        <TextField
          label="New password"
          type="password"
          name="password"
          autoComplete="new-password"
          value={password}
          onChange={(e) => setPassword(e.target.value)}
          error={errors.fieldErrors.password}
          hint="At least 10 characters, with a letter and a digit or symbol."
          autoFocus
        />
        <TextField
          label="Repeat the new password"
          type="password"
          name="repeated"
          autoComplete="new-password"
          value={repeated}
          onChange={(e) => setRepeated(e.target.value)}
          error={errors.fieldErrors.repeated}
        />
        <FormError message={errors.formError ?? errors.fieldErrors.token} />
        <div>
          <Button type="submit" busy={confirmReset.isPending}>
            Set password
          </Button>
        </div>
      </form>
    </AuthLayout>
  );
}
