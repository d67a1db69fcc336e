import { useState, type ReactNode } from 'react';
import { Link } from 'react-router-dom';
import { projectRoleAllows } from '@shared/roles';
import type { Project } from '@shared/schemas/projects';
import { Button } from '@/components/ui/button';
import { Card } from '@/components/ui/card';
import { paths } from '@/config/paths';
import { formatDateTime } from '@/lib/format';
import { ActivityCard } from '@/features/projects/components/activity-card';
import { ProjectArchiveCard } from '@/features/projects/components/project-archive-card';
import { ProjectDetailsForm } from '@/features/projects/components/project-details-form';
import { ProjectRoleBadge, projectRoleDuties } from '@/features/projects/components/project-role-badge';

function Fact({ term, children }: { term: string; children: ReactNode }) {
  return (
    <div className="flex flex-col gap-0.5 border-b border-line/70 py-3 last:border-b-0">
      <dt className="text-xs font-bold tracking-wide text-ink-soft uppercase">{term}</dt>
      <dd className="text-ink">{children}</dd>
    </div>
  );
}

export function ProjectOverview({ project }: { project: Project }) {
  const [editing, setEditing] = useState(false);
  const canManage = projectRoleAllows(project.myRole, 'manage');

  return (
    <div className="grid gap-6 lg:grid-cols-[minmax(0,1fr)_20rem]">
      <div className="flex min-w-0 flex-col gap-6">
        <Card
          title="About this project"
          actions={
            canManage && !editing ? (
              <Button variant="secondary" size="sm" onClick={() => setEditing(true)}>
                Edit details
              </Button>
            ) : null
          }
        >
          {editing ? (
            <ProjectDetailsForm project={project} onDone={() => setEditing(false)} />
          ) : project.description ? (
            <p className="leading-relaxed whitespace-pre-line">{project.description}</p>
          ) : (
            <p className="text-ink-soft">
              No description yet.
              {canManage
                ? ' Add a line or two about the device — target wavelength, the two channels, who it is for — so teammates know what they are looking at.'
                : ' An owner can add one.'}
            </p>
          )}
        </Card>
        <ActivityCard projectId={project.id} />
        {canManage ? <ProjectArchiveCard project={project} /> : null}
      </div>

      <Card title="At a glance" headingLevel="h2">
        <dl>
          <Fact term="Your role">
            {project.myRole ? (
              <span className="flex flex-col items-start gap-1">
                <ProjectRoleBadge role={project.myRole} />
                <span className="text-sm text-ink-soft">{projectRoleDuties(project.myRole)}</span>
              </span>
            ) : (
              '—'
            )}
          </Fact>
          <Fact term="Created by">{project.createdBy?.name ?? 'A former member'}</Fact>
          <Fact term="Started">
            <time dateTime={project.createdAt}>{formatDateTime(project.createdAt)}</time>
          </Fact>
          <Fact term="Last change">
            <time dateTime={project.updatedAt}>{formatDateTime(project.updatedAt)}</time>
          </Fact>
          <Fact term="Members">
            <Link
              to={paths.projects.members.getHref(project.id)}
              className="rounded font-bold text-teal underline-offset-4 hover:underline"
            >
              {project.memberCount} {project.memberCount === 1 ? 'person' : 'people'}
            </Link>
          </Fact>
          <Fact term="Status">{project.archived ? 'Archived' : 'Active'}</Fact>
        </dl>
      </Card>
    </div>
  );
}
