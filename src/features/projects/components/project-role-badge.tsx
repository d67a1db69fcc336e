import { PROJECT_ROLE_LABELS, type ProjectRole } from '@shared/roles';
import { Badge } from '@/components/ui/badge';

const tones = { owner: 'ember', designer: 'teal', reviewer: 'ink', viewer: 'muted' } as const;
const names: Record<ProjectRole, string> = { owner: 'Owner', designer: 'Designer', reviewer: 'Reviewer', viewer: 'Viewer' };

export function projectRoleName(role: ProjectRole): string {
  return names[role];
}

export function ProjectRoleBadge({ role }: { role: ProjectRole }) {
  return <Badge tone={tones[role]}>{names[role]}</Badge>;
}

/** The part of the shared role label after the dash: what the role may do. */
export function projectRoleDuties(role: ProjectRole): string {
  const label = PROJECT_ROLE_LABELS[role];
  const dash = label.indexOf(' — ');
  return dash === -1 ? label : label.slice(dash + 3);
}
