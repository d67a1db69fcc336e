/** Site-wide roles: an admin manages accounts and may act as owner on every project. */
export const SITE_ROLES = ['admin', 'member'] as const;
export type SiteRole = (typeof SITE_ROLES)[number];

/** Per-project roles, from most to least powerful. */
export const PROJECT_ROLES = ['owner', 'designer', 'reviewer', 'viewer'] as const;
export type ProjectRole = (typeof PROJECT_ROLES)[number];

/** What each project role may do. The server enforces these; the client only uses them to hide buttons. */
export const PROJECT_ABILITIES = {
  read: ['owner', 'designer', 'reviewer', 'viewer'],
  comment: ['owner', 'designer', 'reviewer'],
  design: ['owner', 'designer'],
  manage: ['owner'],
} as const satisfies Record<string, readonly ProjectRole[]>;
export type ProjectAbility = keyof typeof PROJECT_ABILITIES;

export function projectRoleAllows(role: ProjectRole | null | undefined, ability: ProjectAbility): boolean {
  return role != null && (PROJECT_ABILITIES[ability] as readonly ProjectRole[]).includes(role);
}

export const PROJECT_ROLE_LABELS: Record<ProjectRole, string> = {
  owner: 'Owner — manages members and settings',
  designer: 'Designer — edits designs and starts runs',
  reviewer: 'Reviewer — reads and comments',
  viewer: 'Viewer — reads only',
};
