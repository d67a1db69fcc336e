import { ProjectOverview } from '@/features/projects/components/project-overview';
import { useProjectOutlet } from '@/app/routes/app/project/project-context';

export default function ProjectOverviewRoute() {
  const { project } = useProjectOutlet();
  return <ProjectOverview project={project} />;
}
