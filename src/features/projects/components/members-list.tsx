import { useState } from 'react';
import { PROJECT_ROLES, type ProjectRole } from '@shared/roles';
import type { Member, Project } from '@shared/schemas/projects';
import { Banner } from '@/components/ui/banner';
import { Button } from '@/components/ui/button';
import { ConfirmDialog } from '@/components/ui/confirm-dialog';
import { plainSelectClasses } from '@/components/ui/field';
import { Spinner } from '@/components/ui/spinner';
import { formatDate } from '@/lib/format';
import { useChangeMemberRole } from '@/features/projects/api/change-member-role';
import { useRemoveMember } from '@/features/projects/api/remove-member';
import { ProjectRoleBadge, projectRoleName } from '@/features/projects/components/project-role-badge';

interface MembersListProps {
  project: Project;
  members: Member[];
  currentUserId: number;
  canManage: boolean;
  onLeft: () => void;
}

export function MembersList({ project, members, currentUserId, canManage, onLeft }: MembersListProps) {
  const changeRole = useChangeMemberRole(project.id);
  const remove = useRemoveMember(project.id);
  const [removing, setRemoving] = useState<Member | null>(null);
  const leaving = removing?.userId === currentUserId;

  return (
    <>
      {changeRole.error ? <Banner className="mb-4">{changeRole.error.message}</Banner> : null}
      <div className="relative overflow-x-auto">
        <table className="w-full min-w-[34rem] text-sm">
          <caption className="sr-only">Members of {project.name}</caption>
          <thead className="border-b border-line text-left text-ink-soft">
            <tr>
              <th scope="col" className="py-2.5 pr-4 font-bold">
                Name
              </th>
              <th scope="col" className="py-2.5 pr-4 font-bold">
                Role
              </th>
              <th scope="col" className="py-2.5 pr-4 font-bold">
                Added
              </th>
              <th scope="col" className="py-2.5 text-right font-bold">
                <span className="sr-only">Actions</span>
              </th>
            </tr>
          </thead>
          <tbody className="divide-y divide-line/70">
            {members.map((member) => {
              const isSelf = member.userId === currentUserId;
              const rowPending = changeRole.isPending && changeRole.variables?.userId === member.userId;
              return (
                <tr key={member.userId}>
                  <td className="py-3 pr-4">
                    <span className="font-bold">{member.name}</span>
                    {isSelf ? <span className="ml-2 text-xs font-bold text-teal">(you)</span> : null}
                    <span className="block text-ink-soft">{member.email}</span>
                  </td>
                  <td className="py-3 pr-4">
                    {canManage ? (
                      <span className="inline-flex items-center gap-2">
                        <select
                          aria-label={`Role of ${member.name}`}
                          className={plainSelectClasses}
                          value={member.role}
                          disabled={changeRole.isPending}
                          onChange={(event) =>
                            changeRole.mutate({ userId: member.userId, role: event.target.value as ProjectRole })
                          }
                        >
                          {PROJECT_ROLES.map((role) => (
                            <option key={role} value={role}>
                              {projectRoleName(role)}
                            </option>
                          ))}
                        </select>
                        {rowPending ? <Spinner className="size-4 text-ember" /> : null}
                      </span>
                    ) : (
                      <ProjectRoleBadge role={member.role} />
                    )}
                  </td>
                  <td className="py-3 pr-4 whitespace-nowrap text-ink-soft">
                    <time dateTime={member.addedAt}>{formatDate(member.addedAt)}</time>
                  </td>
                  <td className="py-3 text-right">
                    {isSelf ? (
                      <Button variant="danger" size="sm" onClick={() => setRemoving(member)}>
                        Leave project
                      </Button>
                    ) : canManage ? (
                      <Button
                        variant="danger"
                        size="sm"
                        aria-label={`Remove ${member.name}`}
                        onClick={() => setRemoving(member)}
                      >
                        Remove
                      </Button>
                    ) : null}
                  </td>
                </tr>
              );
            })}
          </tbody>
        </table>
      </div>

      <ConfirmDialog
        open={removing !== null}
        title={leaving ? `Leave “${project.name}”?` : `Remove ${removing?.name ?? ''}?`}
        confirmLabel={leaving ? 'Leave project' : 'Remove member'}
        pending={remove.isPending}
        error={remove.error?.message}
        onClose={() => {
          remove.reset();
          setRemoving(null);
        }}
        onConfirm={() => {
          if (!removing) return;
          remove.mutate(
            { userId: removing.userId, leaving },
            {
              onSuccess: () => {
                setRemoving(null);
                if (leaving) onLeft();
              },
            },
          );
        }}
      >
        {leaving
          ? 'You will no longer see this project. An owner can add you again later.'
          : `${removing?.name ?? 'This person'} loses access to this project. An owner can add them again later.`}
      </ConfirmDialog>
    </>
  );
}
