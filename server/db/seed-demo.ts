/**
 * The demo scenario: an invented research group, the Harbourlight Photonics Group, with four people and two
 * projects. Idempotent: people and projects that already exist are left as they are.
 */
import type { Sequelize } from 'sequelize';
import type { ProjectRole, SiteRole } from '../../shared/roles';
import { MembershipModel } from '../components/projects/membership.model';
import { ProjectModel } from '../components/projects/project.model';
import { UserModel } from '../components/users/user.model';
import { hashPassword } from '../components/users/user.service';

export const DEMO_PASSWORD = 'phasewright-demo';

export const DEMO_PEOPLE = [
  { key: 'iris', email: 'iris.calder@harbourlight.example', name: 'Iris Calder', siteRole: 'admin' },
  { key: 'tomas', email: 'tomas.reyes@harbourlight.example', name: 'Tomás Reyes', siteRole: 'member' },
  { key: 'noor', email: 'noor.haddad@harbourlight.example', name: 'Noor Haddad', siteRole: 'member' },
  { key: 'kai', email: 'kai.brenner@harbourlight.example', name: 'Kai Brenner', siteRole: 'member' },
] as const satisfies readonly { key: string; email: string; name: string; siteRole: SiteRole }[];

type PersonKey = (typeof DEMO_PEOPLE)[number]['key'];

const DEMO_PROJECTS: { name: string; description: string; members: Partial<Record<PersonKey, ProjectRole>> }[] = [
  {
    name: 'Twin-image security tag',
    description:
      'Two far-field images on one array: a lighthouse under left-circular light and a compass rose under ' +
      'right-circular light. Silicon-nitride pillars on fused silica at 633 nm.',
    members: { tomas: 'owner', noor: 'reviewer', kai: 'viewer', iris: 'designer' },
  },
  {
    name: 'Bessel and charge-2 vortex pair',
    description:
      'A zeroth-order Bessel beam under x-polarized light and a charge-2 vortex Bessel beam under y-polarized ' +
      'light, from one axicon-based metasurface for an optical-trapping bench.',
    members: { tomas: 'owner', noor: 'reviewer', kai: 'viewer' },
  },
];

export async function seedDemo(sequelize: Sequelize, bcryptCost: number): Promise<{ created: string[] }> {
  const created: string[] = [];
  const people = new Map<PersonKey, UserModel>();
  const passwordHash = await hashPassword(DEMO_PASSWORD, bcryptCost);
  for (const person of DEMO_PEOPLE) {
    const [user, isNew] = await UserModel.findOrCreate({
      where: { email: person.email },
      defaults: { email: person.email, name: person.name, siteRole: person.siteRole, passwordHash },
    });
    if (isNew) created.push(`user ${person.email}`);
    people.set(person.key, user);
  }
  for (const spec of DEMO_PROJECTS) {
    if (await ProjectModel.findOne({ where: { name: spec.name } })) continue;
    await sequelize.transaction(async (transaction) => {
      const owner = Object.entries(spec.members).find(([, role]) => role === 'owner')?.[0] as PersonKey;
      const project = await ProjectModel.create(
        { name: spec.name, description: spec.description, createdById: people.get(owner)!.id },
        { transaction },
      );
      for (const [key, role] of Object.entries(spec.members) as [PersonKey, ProjectRole][]) {
        await MembershipModel.create({ projectId: project.id, userId: people.get(key)!.id, role }, { transaction });
      }
    });
    created.push(`project "${spec.name}"`);
  }
  return { created };
}
