import { useState } from 'react';
import type { PendingInvitation } from '@shared/schemas/projects';
import { Banner } from '@/components/ui/banner';
import { Button } from '@/components/ui/button';
import { ConfirmDialog } from '@/components/ui/confirm-dialog';
import { PageLoader } from '@/components/ui/spinner';
import { formatDate, formatDateTime } from '@/lib/format';
import { useInvitations } from '@/features/projects/api/get-invitations';
import { useResendInvitation } from '@/features/projects/api/resend-invitation';
import { useRevokeInvitation } from '@/features/projects/api/revoke-invitation';
import { ProjectRoleBadge } from '@/features/projects/components/project-role-badge';

function linkStatus(invitation: PendingInvitation, now: number) {
  if (!invitation.expiresAt) return { text: 'No usable link — resend', expired: true };
  if (Date.parse(invitation.expiresAt) < now) return { text: `Link expired ${formatDate(invitation.expiresAt)}`, expired: true };
  return { text: `Link works until ${formatDateTime(invitation.expiresAt)}`, expired: false };
}

export function PendingInvitations({ projectId }: { projectId: number }) {
  const invitations = useInvitations(projectId);
  const resend = useResendInvitation(projectId);
  const revoke = useRevokeInvitation(projectId);
  const [revoking, setRevoking] = useState<PendingInvitation | null>(null);
  const [resentTo, setResentTo] = useState<string | null>(null);

  if (invitations.isPending) return <PageLoader label="Loading invitations" />;
  if (invitations.isError) {
    return (
      <Banner title="The invitations did not load">
        <p>{invitations.error.message}</p>
        <Button variant="secondary" size="sm" className="mt-3" onClick={() => void invitations.refetch()}>
          Try again
        </Button>
      </Banner>
    );
  }
  if (invitations.data.length === 0) {
    return <p className="text-sm text-ink-soft">Nobody is waiting to accept an invitation.</p>;
  }

  const now = Date.now();
  return (
    <>
      {resend.error ? <Banner className="mb-4">{resend.error.message}</Banner> : null}
      {resentTo && !resend.error ? (
        <p role="status" className="mb-4 text-sm font-bold text-teal">
          A new invitation is on its way to {resentTo}; the earlier link no longer works.
        </p>
      ) : null}
      <ul className="divide-y divide-line/70 text-sm" aria-label="Pending invitations">
        {invitations.data.map((invitation) => {
          const status = linkStatus(invitation, now);
          const rowResending = resend.isPending && resend.variables === invitation.userId;
          return (
            <li key={invitation.userId} className="flex flex-wrap items-center gap-x-4 gap-y-2 py-3">
              <div className="min-w-0 flex-1">
                <span className="block truncate font-bold">{invitation.email}</span>
                <span className="block text-ink-soft">
                  Invited <time dateTime={invitation.invitedAt}>{formatDate(invitation.invitedAt)}</time> ·{' '}
                  <span className={status.expired ? 'font-bold text-ember' : undefined}>{status.text}</span>
                </span>
              </div>
              <ProjectRoleBadge role={invitation.role} />
              <span className="flex gap-2">
                <Button
                  variant="secondary"
                  size="sm"
                  aria-label={`Resend the invitation to ${invitation.email}`}
                  pending={rowResending}
                  disabled={resend.isPending}
                  onClick={() =>
                    resend.mutate(invitation.userId, { onSuccess: () => setResentTo(invitation.email) })
                  }
                >
                  Resend
                </Button>
                <Button
                  variant="danger"
                  size="sm"
                  aria-label={`Revoke the invitation to ${invitation.email}`}
                  onClick={() => setRevoking(invitation)}
                >
                  Revoke
                </Button>
              </span>
            </li>
          );
        })}
      </ul>

      <ConfirmDialog
        open={revoking !== null}
        title={`Revoke the invitation to ${revoking?.email ?? ''}?`}
        confirmLabel="Revoke invitation"
        pending={revoke.isPending}
        error={revoke.error?.message}
        onClose={() => {
          revoke.reset();
          setRevoking(null);
        }}
        onConfirm={() => {
          if (!revoking) return;
          revoke.mutate(revoking.userId, {
            onSuccess: () => {
              if (resentTo === revoking.email) setResentTo(null);
              setRevoking(null);
            },
          });
        }}
      >
        The link in their mail stops leading into this project and they leave the member list. You can invite them
        again later.
      </ConfirmDialog>
    </>
  );
}
