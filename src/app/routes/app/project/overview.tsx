import { projectRoleAllows } from '@shared/roles';
import { ProjectOverview } from '@/features/projects/components/project-overview';
import { LatestRunCard } from '@/features/runs/components/latest-run-card';
import { DesignRulesSettingsCard } from '@/features/fab/components/design-rules-settings-card';
import { useProjectOutlet } from '@/app/routes/app/project/project-context';

export default function ProjectOverviewRoute() {
  const { project } = useProjectOutlet();
  return (
    <div className="flex flex-col gap-6">
      <LatestRunCard projectId={project.id} />
      <ProjectOverview project={project} />
      <div className="lg:max-w-[calc(100%-21.5rem)]">
        <DesignRulesSettingsCard projectId={project.id} canManage={projectRoleAllows(project.myRole, 'manage') && !project.archived} />
      </div>
    </div>
  );
}
