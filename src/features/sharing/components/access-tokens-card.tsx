import { useState, type FormEvent } from 'react';
import type { TokenScope } from '@shared/schemas/access';
import { Banner, FormErrorBanner } from '@/components/ui/banner';
import { Button } from '@/components/ui/button';
import { Card } from '@/components/ui/card';
import { SelectField, TextField } from '@/components/ui/field';
import { isApiError } from '@/lib/api-client';
import { useAccessTokens, useCreateAccessToken, useRevokeAccessToken } from '@/features/sharing/api/access-tokens';

const SCOPES = [
  { value: 'read', label: 'Read only — GET requests' },
  { value: 'write', label: 'Read and write — everything your roles allow' },
] as const;

const when = (iso: string | null, none: string) => (iso ? new Date(iso).toLocaleString() : none);

export function AccessTokensCard() {
  const tokens = useAccessTokens();
  const create = useCreateAccessToken();
  const revoke = useRevokeAccessToken();
  const [name, setName] = useState('');
  const [scope, setScope] = useState<TokenScope>('read');
  const [expires, setExpires] = useState('');
  const [currentPassword, setCurrentPassword] = useState('');
  const [secret, setSecret] = useState<string | null>(null);
  const details = isApiError(create.error) ? create.error.details : {};

  const submit = (event: FormEvent) => {
    event.preventDefault();
    const expiresAt = expires ? new Date(`${expires}T23:59:59`).toISOString() : null;
    create.mutate(
      { name, scope, expiresAt, currentPassword },
      { onSuccess: (data) => { setSecret(data.token); setName(''); setExpires(''); setCurrentPassword(''); } },
    );
  };

  return (
    <Card title="Access tokens" description="For scripts and the API: send “Authorization: Bearer <token>”. A token acts as you, with your project roles. Changing your password revokes every token.">
      {secret ? (
        <Banner tone="success" title="Copy the token now — it is shown only this once" className="mb-4">
          <code className="block break-all font-mono text-xs select-all">{secret}</code>
          <Button variant="secondary" size="sm" className="mt-2" onClick={() => setSecret(null)}>
            I have copied it
          </Button>
        </Banner>
      ) : null}
      <form onSubmit={submit} className="grid gap-3 sm:grid-cols-3">
        <TextField label="Name" value={name} onValueChange={setName} error={details.name} placeholder="Nightly batch" />
        <SelectField label="Scope" value={scope} onValueChange={setScope} options={SCOPES} error={details.scope} />
        <TextField label="Expires (optional)" type="date" value={expires} onValueChange={setExpires} error={details.expiresAt} />
        <TextField
          label="Your current password"
          type="password"
          autoComplete="current-password"
          value={currentPassword}
          onValueChange={setCurrentPassword}
          error={details.currentPassword}
        />
        <div className="sm:col-span-3">
          <FormErrorBanner message={create.error && !Object.keys(details).length ? create.error.message : null} />
          <Button type="submit" disabled={create.isPending}>
            Create token
          </Button>
        </div>
      </form>
      <ul className="mt-5 divide-y divide-line text-sm">
        {tokens.data?.map((token) => (
          <li key={token.id} className="flex flex-wrap items-center justify-between gap-2 py-2">
            <div>
              <p className="font-bold">
                {token.name} <span className="font-mono text-xs text-ink-soft">{token.prefix}…</span> · {token.scope === 'read' ? 'read only' : 'read and write'}
              </p>
              <p className="text-ink-soft">
                Last used {when(token.lastUsedAt, 'never')} · expires {when(token.expiresAt, 'never')}
                {token.revokedAt ? ` · revoked ${when(token.revokedAt, '')}` : ''}
              </p>
            </div>
            {token.revokedAt ? null : (
              <Button variant="danger" size="sm" disabled={revoke.isPending} onClick={() => revoke.mutate(token.id)}>
                Revoke
              </Button>
            )}
          </li>
        ))}
        {tokens.data?.length === 0 ? <li className="py-2 text-ink-soft">No tokens yet.</li> : null}
      </ul>
    </Card>
  );
}
