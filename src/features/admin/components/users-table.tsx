import { useState } from 'react';
import { SITE_ROLES, type SiteRole } from '@shared/roles';
import type { User } from '@shared/schemas/auth';
import { Badge } from '@/components/ui/badge';
import { Banner } from '@/components/ui/banner';
import { Button } from '@/components/ui/button';
import { ConfirmDialog } from '@/components/ui/confirm-dialog';
import { plainSelectClasses } from '@/components/ui/field';
import { Spinner } from '@/components/ui/spinner';
import { formatDateTime, formatRelative } from '@/lib/format';
import { useUpdateUser } from '@/features/admin/api/update-user';
import { siteRoleName } from '@/features/admin/components/site-role';

export function UsersTable({ users, currentUserId }: { users: User[]; currentUserId: number }) {
  const update = useUpdateUser();
  const [disabling, setDisabling] = useState<User | null>(null);
  const pendingId = update.isPending ? update.variables?.userId : undefined;

  return (
    <>
      {update.error && !disabling ? <Banner className="mb-4">{update.error.message}</Banner> : null}
      <div className="relative overflow-x-auto">
        <table className="w-full min-w-[48rem] text-sm">
          <caption className="sr-only">People with a Phasewright account</caption>
          <thead className="border-b border-line text-left text-ink-soft">
            <tr>
              <th scope="col" className="py-2.5 pr-4 font-bold">
                Name
              </th>
              <th scope="col" className="py-2.5 pr-4 font-bold">
                E-mail
              </th>
              <th scope="col" className="py-2.5 pr-4 font-bold">
                Site role
              </th>
              <th scope="col" className="py-2.5 pr-4 font-bold">
                Status
              </th>
              <th scope="col" className="py-2.5 pr-4 font-bold">
                Last sign-in
              </th>
              <th scope="col" className="py-2.5 text-right font-bold">
                <span className="sr-only">Actions</span>
              </th>
            </tr>
          </thead>
          <tbody className="divide-y divide-line/70">
            {users.map((user) => {
              const isSelf = user.id === currentUserId;
              return (
                <tr key={user.id} className={user.disabled ? 'text-ink-soft' : ''}>
                  <td className="py-3 pr-4 font-bold">
                    {user.name}
                    {isSelf ? <span className="ml-2 text-xs text-teal">(you)</span> : null}
                  </td>
                  <td className="py-3 pr-4 break-all">{user.email}</td>
                  <td className="py-3 pr-4">
                    {isSelf ? (
                      siteRoleName(user.siteRole)
                    ) : (
                      <span className="inline-flex items-center gap-2">
                        <select
                          aria-label={`Site role of ${user.name}`}
                          className={plainSelectClasses}
                          value={user.siteRole}
                          disabled={update.isPending}
                          onChange={(event) =>
                            update.mutate({ userId: user.id, input: { siteRole: event.target.value as SiteRole } })
                          }
                        >
                          {SITE_ROLES.map((role) => (
                            <option key={role} value={role}>
                              {siteRoleName(role)}
                            </option>
                          ))}
                        </select>
                        {pendingId === user.id ? <Spinner className="size-4 text-ember" /> : null}
                      </span>
                    )}
                  </td>
                  <td className="py-3 pr-4">
                    {user.disabled ? <Badge tone="danger">Disabled</Badge> : <Badge tone="teal">Active</Badge>}
                  </td>
                  <td className="py-3 pr-4 whitespace-nowrap">
                    {user.lastSignInAt ? (
                      <time dateTime={user.lastSignInAt} title={formatDateTime(user.lastSignInAt)}>
                        {formatRelative(user.lastSignInAt)}
                      </time>
                    ) : (
                      <span className="text-ink-soft">Never</span>
                    )}
                  </td>
                  <td className="py-3 text-right">
                    {isSelf ? null : user.disabled ? (
                      <Button
                        variant="secondary"
                        size="sm"
                        aria-label={`Enable ${user.name}`}
                        disabled={update.isPending}
                        onClick={() => update.mutate({ userId: user.id, input: { disabled: false } })}
                      >
                        Enable
                      </Button>
                    ) : (
                      <Button
                        variant="danger"
                        size="sm"
                        aria-label={`Disable ${user.name}`}
                        disabled={update.isPending}
                        onClick={() => {
                          update.reset();
                          setDisabling(user);
                        }}
                      >
                        Disable
                      </Button>
                    )}
                  </td>
                </tr>
              );
            })}
          </tbody>
        </table>
      </div>
      <ConfirmDialog
        open={disabling !== null}
        title={`Disable ${disabling?.name ?? ''}?`}
        confirmLabel="Disable account"
        pending={update.isPending}
        error={update.error?.message}
        onClose={() => {
          update.reset();
          setDisabling(null);
        }}
        onConfirm={() => {
          if (!disabling) return;
          update.mutate(
            { userId: disabling.id, input: { disabled: true } },
            { onSuccess: () => setDisabling(null) },
          );
        }}
      >
        They can no longer sign in. Their projects, memberships and history stay; enable the account again at any
        time.
      </ConfirmDialog>
    </>
  );
}
