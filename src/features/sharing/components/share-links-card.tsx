import { useState } from 'react';
import { Banner, FormErrorBanner } from '@/components/ui/banner';
import { Button } from '@/components/ui/button';
import { Card } from '@/components/ui/card';
import { TextField } from '@/components/ui/field';
import { isApiError } from '@/lib/api-client';
import { useCreateShareLink, useRevokeShareLink, useShareLinks } from '@/features/sharing/api/share-links';

const when = (iso: string | null, none: string) => (iso ? new Date(iso).toLocaleString() : none);

/** Owners hand an outside reviewer a read-only address of this one run, and can withdraw it. */
export function ShareLinksCard({ projectId, runId }: { projectId: number; runId: number }) {
  const links = useShareLinks(projectId, runId);
  const create = useCreateShareLink(projectId, runId);
  const revoke = useRevokeShareLink(projectId, runId);
  const [expires, setExpires] = useState('');
  const [url, setUrl] = useState<string | null>(null);
  const details = isApiError(create.error) ? create.error.details : {};

  return (
    <Card title="Share links" description="A read-only view of this run for someone without an account. It shows no other run, no design editor and no members.">
      {url ? (
        <Banner tone="success" title="Copy the address now — it is shown only this once" className="mb-4">
          <code className="block break-all font-mono text-xs select-all">{url}</code>
        </Banner>
      ) : null}
      <div className="flex flex-wrap items-end gap-3">
        <TextField label="Expires (optional)" type="date" value={expires} onValueChange={setExpires} error={details.expiresAt} />
        <Button
          disabled={create.isPending}
          onClick={() => create.mutate(expires ? new Date(`${expires}T23:59:59`).toISOString() : null, { onSuccess: (d) => setUrl(d.url) })}
        >
          Create a share link
        </Button>
      </div>
      <FormErrorBanner message={create.error && !Object.keys(details).length ? create.error.message : null} />
      <ul className="mt-4 divide-y divide-line text-sm">
        {links.data?.map((link) => (
          <li key={link.id} className="flex flex-wrap items-center justify-between gap-2 py-2">
            <p>
              <span className="font-mono text-xs">{link.prefix}…</span> by {link.createdBy?.name ?? 'a former member'} on {when(link.createdAt, '')} · expires{' '}
              {when(link.expiresAt, 'never')}
              {link.revokedAt ? ` · withdrawn ${when(link.revokedAt, '')}` : ''}
            </p>
            {link.revokedAt ? null : (
              <Button variant="danger" size="sm" disabled={revoke.isPending} onClick={() => revoke.mutate(link.id)}>
                Withdraw
              </Button>
            )}
          </li>
        ))}
      </ul>
    </Card>
  );
}
