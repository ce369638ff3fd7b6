import { useState, type FormEvent } from 'react';
import { Link } from 'react-router';
import { passwordResetRequestSchema } from '@shared/auth';
import { validate, useFormErrors } from '../../../lib/forms';
import { Button } from '../../../ui/Button';
import { FormError, TextField } from '../../../ui/Field';
import { useRequestPasswordReset } from '../api/session';
import { AuthLayout } from '../components/AuthLayout';

export function ResetRequestPage() {
  const [email, setEmail] = useState('');
  const errors = useFormErrors();
  const requestReset = useRequestPasswordReset();

  function submit(event: FormEvent) {
    event.preventDefault();
    errors.clear();
    const checked = validate(passwordResetRequestSchema, { email });
    if (!checked.ok) return errors.setFieldErrors(checked.errors);
    requestReset.mutate(checked.data, { onError: errors.fromServer });
  }

  return (
    <AuthLayout
      title="Reset your password"
      lead="We e-mail you a link that lets you choose a new password. It works once, for one hour."
      footer={
        <Link to="/signin" className="text-accent hover:underline">
          Back to sign in
        </Link>
      }
    >
      {requestReset.isSuccess ? (
        <p role="status" className="text-sm leading-relaxed">
          If an account exists for <span className="font-medium">{requestReset.variables?.email}</span>, a link to
          reset its password is on its way.
        </p>
      ) : (
        <form onSubmit={submit} noValidate className="flex flex-col gap-6" aria-label="Request password reset">
          <TextField
            label="E-mail"
            type="email"
            name="email"
            autoComplete="username"
            value={email}
            onChange={(e) => setEmail(e.target.value)}
            error={errors.fieldErrors.email}
            autoFocus
          />
          <FormError message={errors.formError} />
          <div>
            <Button type="submit" busy={requestReset.isPending}>
              Send link
            </Button>
          </div>
        </form>
      )}
    </AuthLayout>
  );
}
