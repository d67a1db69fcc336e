import { PROJECT_ROLES } from '@shared/roles';
import { ProjectRoleBadge, projectRoleDuties } from '@/features/projects/components/project-role-badge';

export function RoleGuide() {
  return (
    <ul className="flex flex-col gap-3">
      {PROJECT_ROLES.map((role) => (
        <li key={role} className="flex flex-col items-start gap-1">
          <ProjectRoleBadge role={role} />
          <span className="text-sm text-ink-soft">{projectRoleDuties(role)}</span>
        </li>
      ))}
    </ul>
  );
}
