import type { QueryClient } from '@tanstack/react-query';
import { useNavigate, type LoaderFunctionArgs } from 'react-router-dom';
import { projectRoleAllows } from '@shared/roles';
import { Banner } from '@/components/ui/banner';
import { Button } from '@/components/ui/button';
import { Card } from '@/components/ui/card';
import { PageLoader } from '@/components/ui/spinner';
import { paths } from '@/config/paths';
import { useCurrentUser, useMe } from '@/features/auth/api/get-me';
import { membersQueryOptions, useMembers } from '@/features/projects/api/get-members';
import { AddMemberForm } from '@/features/projects/components/add-member-form';
import { MembersList } from '@/features/projects/components/members-list';
import { PendingInvitations } from '@/features/projects/components/pending-invitations';
import { RoleGuide } from '@/features/projects/components/role-guide';
import { parseProjectId, useProjectOutlet } from '@/app/routes/app/project/project-context';

export const clientLoader =
  (queryClient: QueryClient) =>
  async ({ params }: LoaderFunctionArgs) => {
    const projectId = parseProjectId(params.projectId);
    if (projectId) await queryClient.prefetchQuery(membersQueryOptions(projectId));
    return null;
  };

export default function ProjectMembersRoute() {
  const { project } = useProjectOutlet();
  const user = useCurrentUser();
  const signupOpen = useMe().data?.signupOpen ?? false;
  const navigate = useNavigate();
  const members = useMembers(project.id);
  const canManage = projectRoleAllows(project.myRole, 'manage');

  return (
    <div className="grid gap-6 xl:grid-cols-[minmax(0,1fr)_18rem]">
      <title>{`Members of ${project.name} · Phasewright`}</title>
      <div className="flex min-w-0 flex-col gap-6">
        {canManage ? (
          <Card title="Add a member" description="Give a colleague access to this project and choose what they may do.">
            <AddMemberForm projectId={project.id} mayInvite={signupOpen || user.siteRole === 'admin'} />
          </Card>
        ) : null}
        <Card
          title="Members"
          description={
            canManage
              ? 'Change a role from the list; it takes effect at once.'
              : 'Only owners can add people or change roles. You can leave the project yourself.'
          }
        >
          {members.isPending ? (
            <PageLoader label="Loading members" />
          ) : members.isError ? (
            <Banner title="The member list did not load">
              <p>{members.error.message}</p>
              <Button variant="secondary" size="sm" className="mt-3" onClick={() => void members.refetch()}>
                Try again
              </Button>
            </Banner>
          ) : (
            <MembersList
              project={project}
              members={members.data}
              currentUserId={user.id}
              canManage={canManage}
              onLeft={() => navigate(paths.home.getHref(), { replace: true })}
            />
          )}
        </Card>
        {canManage ? (
          <Card
            title="Pending invitations"
            description="People invited by e-mail who have not chosen a password yet. Resend a fresh link or withdraw the invitation."
          >
            <PendingInvitations projectId={project.id} />
          </Card>
        ) : null}
      </div>
      <Card title="What each role can do" headingLevel="h2" className="self-start">
        <RoleGuide />
      </Card>
    </div>
  );
}
