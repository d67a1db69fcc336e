import type { SharedRun, ShareLink } from '../../../shared/schemas/access';
import type { AppContext } from '../../context';
import { AppError } from '../../lib/app-error';
import { hashToken, newToken } from '../../lib/tokens';
import { findRun, getRun } from '../runs/run.service';
import { UserModel } from '../users/user.model';
import { ProjectModel } from '../projects/project.model';
import { ShareLinkModel } from './share-link.model';

const iso = (d: Date | null | undefined) => (d ? d.toISOString() : null);
const withCreator = [{ model: UserModel, as: 'createdBy', attributes: ['id', 'name'] }];

function toDto(row: ShareLinkModel): ShareLink {
  return {
    id: row.id,
    runId: row.runId,
    prefix: row.prefix,
    createdAt: row.createdAt.toISOString(),
    createdBy: row.createdBy ? { id: row.createdBy.id, name: row.createdBy.name } : null,
    expiresAt: iso(row.expiresAt),
    revokedAt: iso(row.revokedAt),
  };
}

export async function listShareLinks(projectId: number, runId: number): Promise<ShareLink[]> {
  await findRun(projectId, runId);
  const rows = await ShareLinkModel.findAll({ where: { projectId, runId }, include: withCreator, order: [['id', 'DESC']] });
  return rows.map(toDto);
}

/** Creates a read-only link to run `runId`; its token (and so the address) is returned here once. */
export async function createShareLink(ctx: AppContext, projectId: number, runId: number, userId: number, expiresAt: string | null) {
  await findRun(projectId, runId);
  const { token, hash } = newToken();
  const created = await ShareLinkModel.create({
    projectId,
    runId,
    createdById: userId,
    tokenHash: hash,
    prefix: token.slice(0, 6),
    expiresAt: expiresAt ? new Date(expiresAt) : null,
  });
  const row = await ShareLinkModel.findByPk(created.id, { include: withCreator });
  return { shareLink: toDto(row!), token, url: `${ctx.config.publicUrl}/shared/${token}` };
}

export async function revokeShareLink(projectId: number, linkId: number): Promise<ShareLink> {
  const row = await ShareLinkModel.findOne({ where: { id: linkId, projectId }, include: withCreator });
  if (!row) throw new AppError(404, `This project has no share link ${linkId}`);
  if (!row.revokedAt) {
    row.revokedAt = new Date();
    await row.save();
  }
  return toDto(row);
}

/** The live link behind `token`: 404 when there is none, 410 once it was revoked or has expired. */
export async function resolveShareLink(token: string): Promise<{ link: ShareLinkModel; project: ProjectModel }> {
  const link = /^[A-Za-z0-9_-]{32,128}$/.test(token) ? await ShareLinkModel.findOne({ where: { tokenHash: hashToken(token) } }) : null;
  if (!link) throw new AppError(404, 'There is no share link at this address — check it, or ask the project owner for a new link');
  if (link.revokedAt) throw new AppError(410, 'This share link was withdrawn by the project owner — ask them for a new one');
  if (link.expiresAt && link.expiresAt.getTime() <= Date.now()) {
    throw new AppError(410, `This share link expired on ${link.expiresAt.toISOString().slice(0, 10)} — ask the project owner for a new one`);
  }
  const project = await ProjectModel.findByPk(link.projectId);
  if (!project) throw new AppError(404, 'There is no share link at this address — check it, or ask the project owner for a new link');
  return { link, project };
}

/** The shared run as an outside reviewer sees it: no team member names, no status history. */
export async function getSharedRun(token: string): Promise<SharedRun> {
  const { link, project } = await resolveShareLink(token);
  const run = await getRun(project.id, link.runId);
  return { projectName: project.name, expiresAt: iso(link.expiresAt), run: { ...run, startedBy: null, events: [] } };
}
