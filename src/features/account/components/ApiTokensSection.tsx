import { useState, type FormEvent } from 'react';
import { createApiTokenRequestSchema, type CreatedApiToken } from '@shared/apiTokens';
import type { Membership } from '@shared/auth';
import { formatDate, formatDateTime, roleLabels } from '../../../lib/format';
import { validate, useFormErrors } from '../../../lib/forms';
import { Button } from '../../../ui/Button';
import { FormError, SelectField, TextField } from '../../../ui/Field';
import { Empty, ErrorState, Loading } from '../../../ui/States';
import { useApiTokens, useCreateApiToken, useRevokeApiToken } from '../api/apiTokens';

/** Personal API tokens for scripts and notebooks: create (secret shown once), list, revoke. */
export function ApiTokensSection({ memberships }: { memberships: Membership[] }) {
  const tokens = useApiTokens();
  const revoke = useRevokeApiToken();
  const [created, setCreated] = useState<CreatedApiToken | null>(null);

  return (
    <div className="flex max-w-3xl flex-col gap-4">
      <p className="text-sm text-ink-soft">
        A token lets a script act as you in one team, with your role there, by sending{' '}
        <code className="figures">Authorization: Bearer &lt;token&gt;</code>. The API is described at{' '}
        <a className="text-accent underline underline-offset-4" href="/api-docs">
          API reference
        </a>
        .
      </p>
      <CreateTokenForm memberships={memberships} onCreated={setCreated} />
      {created && (
        <div role="status" className="border-l-2 border-accent pl-3 text-sm">
          <p>
            Copy the token <strong>{created.name}</strong> now; it is not shown again.
          </p>
          <code className="figures mt-1 block break-all select-all" aria-label="New API token">
            {created.token}
          </code>
          <Button variant="quiet" onClick={() => setCreated(null)}>
            I have copied it
          </Button>
        </div>
      )}
      {tokens.isPending ? (
        <Loading label="Loading tokens" />
      ) : tokens.isError ? (
        <ErrorState error={tokens.error} onRetry={() => tokens.refetch()} />
      ) : tokens.data.length === 0 ? (
        <Empty>No API tokens yet.</Empty>
      ) : (
        <div className="overflow-x-auto">
          <table className="w-full text-sm" aria-label="API tokens">
            <thead className="text-left text-xs text-ink-soft">
              <tr>
                <th className="py-1 font-normal">Name</th>
                <th className="py-1 font-normal">Team</th>
                <th className="py-1 font-normal">Starts with</th>
                <th className="py-1 font-normal">Created</th>
                <th className="py-1 font-normal">Expires</th>
                <th className="py-1 font-normal">Last used</th>
                <th />
              </tr>
            </thead>
            <tbody>
              {tokens.data.map((token) => (
                <tr key={token.id} className="border-t border-rule">
                  <td className="py-2">{token.name}</td>
                  <td className="py-2">{token.team.name}</td>
                  <td className="figures py-2">{token.hint}…</td>
                  <td className="figures py-2">{formatDate(token.createdAt)}</td>
                  <td className="figures py-2">{token.expiresAt ? formatDate(token.expiresAt) : 'never'}</td>
                  <td className="figures py-2">{token.lastUsedAt ? formatDateTime(token.lastUsedAt) : '—'}</td>
                  <td className="py-2 text-right">
                    <Button
                      variant="danger"
                      busy={revoke.isPending && revoke.variables === token.id}
                      onClick={() => {
                        if (window.confirm(`Revoke the token "${token.name}"? Scripts using it stop working at once.`)) revoke.mutate(token.id);
                      }}
                    >
                      Revoke
                    </Button>
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      )}
      <FormError message={revoke.error?.message} />
    </div>
  );
}

function CreateTokenForm({ memberships, onCreated }: { memberships: Membership[]; onCreated: (token: CreatedApiToken) => void }) {
  const [name, setName] = useState('');
  const [teamId, setTeamId] = useState(memberships[0]?.team.id ?? '');
  const [expiresInDays, setExpiresInDays] = useState('90');
  const errors = useFormErrors();
  const create = useCreateApiToken();

  function submit(event: FormEvent) {
    event.preventDefault();
    errors.clear();
    const checked = validate(createApiTokenRequestSchema, {
      name,
      teamId,
      ...(expiresInDays === '' ? {} : { expiresInDays: Number(expiresInDays) }),
    });
    if (!checked.ok) return errors.setFieldErrors(checked.errors);
    create.mutate(checked.data, {
      onSuccess: (token) => {
        setName('');
        onCreated(token);
      },
      onError: errors.fromServer,
    });
  }

  return (
    <form onSubmit={submit} noValidate aria-label="Create API token" className="flex flex-col gap-3">
      <div className="grid grid-cols-1 gap-4 sm:grid-cols-[2fr_2fr_1fr_auto] sm:items-start">
        <TextField label="Token name" name="name" value={name} onChange={(e) => setName(e.target.value)} error={errors.fieldErrors.name} hint="e.g. the notebook that uses it" />
        <SelectField label="Team" name="teamId" value={teamId} onChange={(e) => setTeamId(e.target.value)} error={errors.fieldErrors.teamId}>
          {memberships.map((ms) => (
            <option key={ms.team.id} value={ms.team.id}>
              {ms.team.name} ({roleLabels[ms.role]})
            </option>
          ))}
        </SelectField>
        <SelectField label="Expires" name="expiresInDays" value={expiresInDays} onChange={(e) => setExpiresInDays(e.target.value)} error={errors.fieldErrors.expiresInDays}>
          <option value="7">in 7 days</option>
          <option value="30">in 30 days</option>
          <option value="90">in 90 days</option>
          <option value="365">in a year</option>
          <option value="">never</option>
        </SelectField>
        {/* tops aligned: a field's hint or message below it must not lift its input; the button sits level with the inputs */}
        <Button type="submit" busy={create.isPending} className="h-9 justify-center sm:mt-5">
          Create token
        </Button>
      </div>
      <FormError message={errors.formError} />
    </form>
  );
}
