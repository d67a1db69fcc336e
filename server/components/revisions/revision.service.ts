import { literal, UniqueConstraintError } from 'sequelize';
import { diffDesigns } from '../../../shared/design-diff';
import { libraryMismatches } from '../../../shared/schemas/atom-libraries';
import type { Design } from '../../../shared/schemas/design';
import type { Revision, RevisionComparison, RevisionSummary } from '../../../shared/schemas/revisions';
import { AppError } from '../../lib/app-error';
import { usableLibrary } from '../atom-libraries/atom-library.service';
import { touchProject } from '../projects/project.model';
import { UploadModel } from '../uploads/upload.model';
import { UserModel } from '../users/user.model';
import { assetUses } from './design-assets';
import { RevisionModel } from './revision.model';

const runCount = literal('(SELECT COUNT(*) FROM runs r WHERE r.revision_id = `Revision`.`id`)');
const createdBy = { model: UserModel, as: 'createdBy', attributes: ['id', 'name'] };

function toSummary(revision: RevisionModel): RevisionSummary {
  return {
    id: revision.id,
    number: revision.number,
    message: revision.message,
    designName: revision.designName,
    createdAt: revision.createdAt.toISOString(),
    createdBy: revision.createdBy ? { id: revision.createdBy.id, name: revision.createdBy.name } : null,
    runCount: Number(revision.get('runCount') ?? 0),
  };
}

function toRevision(revision: RevisionModel): Revision {
  return { ...toSummary(revision), design: JSON.parse(revision.design) as Design };
}

export async function listRevisions(projectId: number): Promise<RevisionSummary[]> {
  const revisions = await RevisionModel.findAll({
    where: { projectId },
    attributes: { exclude: ['design'], include: [[runCount, 'runCount']] },
    include: [createdBy],
    order: [['number', 'DESC']],
  });
  return revisions.map(toSummary);
}

/** The revision model of `number` in the project, or 404. */
export async function findRevision(projectId: number, number: number): Promise<RevisionModel> {
  const revision = await RevisionModel.findOne({
    where: { projectId, number },
    attributes: { include: [[runCount, 'runCount']] },
    include: [createdBy],
  });
  if (!revision) throw new AppError(404, `This project has no revision ${number}`);
  return revision;
}

export async function getRevision(projectId: number, number: number): Promise<Revision> {
  return toRevision(await findRevision(projectId, number));
}

/**
 * Checks what a design refers to on this server: uploads must belong to the project and be of a fitting
 * kind; files on disk are for the command line only; a stored atom library must be usable in the project
 * and made for the design's wavelength and period (within LIBRARY_MATCH_TOLERANCE).
 */
async function checkReferences(projectId: number, userId: number, design: Design) {
  const details: Record<string, string> = {};
  for (const { ref, path, accepts } of assetUses(design)) {
    const field = `design.${path}`;
    if (ref.source === 'file') {
      details[field] = 'files on disk are for the command line; upload the file to the project and refer to it as { "source": "upload", "id": … }';
    } else if (ref.source === 'upload') {
      const upload = await UploadModel.findOne({ where: { id: ref.id, projectId }, attributes: ['id', 'kind'] });
      if (!upload) details[`${field}.id`] = `this project has no upload ${ref.id}`;
      else if (!accepts.includes(upload.kind)) details[`${field}.id`] = `upload ${ref.id} is a ${upload.kind}; this term needs ${accepts.join(' or ')}`;
    }
  }
  const library = design.atomLibrary;
  if (library.source === 'file') {
    details['design.atomLibrary'] = 'library files on disk are for the command line; upload the CSV on the Atom libraries page and use { "source": "library", "id": … }';
  }
  if (library.source === 'library') {
    const found = await usableLibrary(projectId, library.id, userId);
    if ('refusal' in found) details['design.atomLibrary.id'] = found.refusal;
    else {
      const mismatches = libraryMismatches(design.setup, found.library);
      if (mismatches.length) {
        details['design.atomLibrary.id'] = `atom library ${library.id} ("${found.library.name}") does not fit this design: ${mismatches.join('; ')}. Change the design or pick a library made for it`;
      }
    }
  }
  const entries = Object.entries(details);
  if (entries.length) {
    throw new AppError(400, `Invalid body — ${entries.map(([field, message]) => `${field}: ${message}`).join('; ')}`, details);
  }
}

/** Saves the next revision of the project (numbers 1, 2, 3…, never reused). */
export async function createRevision(projectId: number, userId: number, input: { design: Design; message: string }): Promise<Revision> {
  await checkReferences(projectId, userId, input.design);
  for (let attempt = 0; ; attempt++) {
    const last = (await RevisionModel.max('number', { where: { projectId } })) as number | null;
    try {
      const created = await RevisionModel.create({
        projectId,
        number: (last ?? 0) + 1,
        message: input.message,
        designName: input.design.name,
        design: JSON.stringify(input.design),
        createdById: userId,
        atomLibraryId: input.design.atomLibrary.source === 'library' ? input.design.atomLibrary.id : null,
      });
      await touchProject(projectId);
      return getRevision(projectId, created.number);
    } catch (error) {
      // Two saves at the same moment picked the same number: take the next one.
      if (!(error instanceof UniqueConstraintError) || attempt >= 4) throw error;
    }
  }
}

export async function compareRevisions(projectId: number, a: number, b: number): Promise<RevisionComparison> {
  const [ra, rb] = [await getRevision(projectId, a), await getRevision(projectId, b)];
  return { a: ra, b: rb, changes: diffDesigns(ra.design, rb.design) };
}
