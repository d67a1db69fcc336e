/**
 * The demo scenario: an invented research group, the Harbourlight Photonics Group, with four people and two
 * projects, each with a first revision of its design (from demo-assets/designs) and a queued run of it that
 * the run queue finishes at server start. Idempotent: people, projects and revisions that already exist are
 * left as they are.
 */
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import type { Sequelize } from 'sequelize';
import { designSchema } from '../../shared/schemas/design';
import { RevisionModel } from '../components/revisions/revision.model';
import { createRevision } from '../components/revisions/revision.service';
import { createQueuedRun } from '../components/runs/run.service';
import type { ProjectRole, SiteRole } from '../../shared/roles';
import { MembershipModel } from '../components/projects/membership.model';
import { ProjectModel } from '../components/projects/project.model';
import { UserModel } from '../components/users/user.model';
import { hashPassword } from '../components/users/user.service';

export const DEMO_PASSWORD = 'phasewright-demo';
const DEMO_DESIGNS = fileURLToPath(new URL('../../demo-assets/designs/', import.meta.url));

export const DEMO_PEOPLE = [
  { key: 'iris', email: 'iris.calder@harbourlight.example', name: 'Iris Calder', siteRole: 'admin' },
  { key: 'tomas', email: 'tomas.reyes@harbourlight.example', name: 'Tomás Reyes', siteRole: 'member' },
  { key: 'noor', email: 'noor.haddad@harbourlight.example', name: 'Noor Haddad', siteRole: 'member' },
  { key: 'kai', email: 'kai.brenner@harbourlight.example', name: 'Kai Brenner', siteRole: 'member' },
] as const satisfies readonly { key: string; email: string; name: string; siteRole: SiteRole }[];

type PersonKey = (typeof DEMO_PEOPLE)[number]['key'];

const DEMO_PROJECTS: {
  name: string;
  description: string;
  designFile: string;
  members: Partial<Record<PersonKey, ProjectRole>>;
}[] = [
  {
    name: 'Twin-image security tag',
    description:
      'Two far-field images on one array: a lighthouse under left-circular light and a compass rose under ' +
      'right-circular light. Silicon-nitride pillars on fused silica at 633 nm.',
    designFile: 'twin-image.json',
    members: { tomas: 'owner', noor: 'reviewer', kai: 'viewer', iris: 'designer' },
  },
  {
    name: 'Bessel and charge-2 vortex pair',
    description:
      'A zeroth-order Bessel beam under x-polarized light and a charge-2 vortex Bessel beam under y-polarized ' +
      'light, from one axicon-based metasurface for an optical-trapping bench.',
    designFile: 'bessel-vortex.json',
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
    const owner = people.get(Object.entries(spec.members).find(([, role]) => role === 'owner')?.[0] as PersonKey)!;
    let project = await ProjectModel.findOne({ where: { name: spec.name } });
    if (!project) {
      project = await sequelize.transaction(async (transaction) => {
        const made = await ProjectModel.create(
          { name: spec.name, description: spec.description, createdById: owner.id },
          { transaction },
        );
        for (const [key, role] of Object.entries(spec.members) as [PersonKey, ProjectRole][]) {
          await MembershipModel.create({ projectId: made.id, userId: people.get(key)!.id, role }, { transaction });
        }
        return made;
      });
      created.push(`project "${spec.name}"`);
    }
    if (!(await RevisionModel.findOne({ where: { projectId: project.id } }))) {
      const design = designSchema.parse(JSON.parse(readFileSync(path.join(DEMO_DESIGNS, spec.designFile), 'utf8')));
      const revision = await createRevision(project.id, owner.id, { design, message: 'First design of the demo scenario' });
      await createQueuedRun(project.id, revision.id, owner.id);
      created.push(`revision 1 and a run of "${spec.name}"`);
    }
  }
  return { created };
}
