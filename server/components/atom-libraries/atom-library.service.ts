import { literal, Op, type Transaction, type WhereOptions } from 'sequelize';
import { atomLibraryToCsv, type AtomLibrary, type MetaAtom } from '../../../shared/optics/atoms';
import { demoAtomLibrary } from '../../../shared/optics/demo-library';
import { projectRoleAllows, type ProjectRole } from '../../../shared/roles';
import {
  type AtomLibraryDetail,
  type AtomLibraryScope,
  type AtomLibrarySummary,
  type AtomRow,
} from '../../../shared/schemas/atom-libraries';
import { AppError } from '../../lib/app-error';
import { RevisionModel } from '../revisions/revision.model';
import { UserModel } from '../users/user.model';
import { AtomLibraryShareModel } from './atom-library-share.model';
import type { StorableLibrary } from './atom-library-csv';
import { AtomLibraryModel } from './atom-library.model';

/** Who asks, and with which role in the project of the request. */
export interface LibraryViewer {
  userId: number;
  siteAdmin: boolean;
  role: ProjectRole;
}

const owner = { model: UserModel, as: 'owner', attributes: ['id', 'name'] };
const WITHOUT_ATOMS = { exclude: ['atoms'] };
const nm = (metres: number) => Math.round(metres * 1e13) / 1e4;

let demoCache: AtomLibrary | null = null;
/** The approximate demo library at its default wavelength and period (633 nm, 450 nm). */
function demoLibrary(): AtomLibrary {
  demoCache ??= demoAtomLibrary();
  return demoCache;
}

function toRows(atoms: MetaAtom[]): AtomRow[] {
  return atoms.map((a) => ({
    id: a.id,
    shape: a.shape,
    widthNm: nm(a.width),
    lengthNm: nm(a.length),
    heightNm: nm(a.height),
    tx: a.tx,
    alphaX: a.alphaX,
    ty: a.ty,
    alphaY: a.alphaY,
  }));
}

function demoSummary(): AtomLibrarySummary {
  const lib = demoLibrary();
  return {
    id: 'demo',
    name: lib.name,
    material: lib.material,
    source: lib.source ?? null,
    wavelengthNm: nm(lib.lambda),
    periodNm: nm(lib.period),
    heightNm: nm(lib.height),
    approximate: true,
    atomCount: lib.atoms.length,
    scope: 'demo',
    owner: null,
    usable: true,
    canDelete: false,
    sharedHere: false,
    canShare: false,
    createdAt: null,
  };
}

/** Personal libraries their owners shared with the project (atom_library_shares). */
function sharedWith(projectId: number) {
  return literal(`(SELECT s.atom_library_id FROM atom_library_shares s WHERE s.project_id = ${Number(projectId)})`);
}

/**
 * Libraries a revision of the project may use, saved by `userId`: the project's own libraries, personal ones
 * their owners shared with it, and the person's own personal libraries (saving a revision with one is their
 * own act of sharing). Nobody else's personal library, a site admin's included.
 */
function usableWhere(projectId: number, userId: number): WhereOptions {
  return {
    [Op.or]: [
      { scope: 'project', projectId: Number(projectId) },
      { scope: 'personal', id: { [Op.in]: sharedWith(projectId) } },
      { scope: 'personal', ownerId: Number(userId) },
    ],
  };
}

/** Usable here, or used by a revision of this project (then readable, though perhaps no longer usable). */
function visibleWhere(projectId: number, userId: number): WhereOptions {
  const id = Number(projectId);
  return {
    [Op.or]: [
      usableWhere(id, userId),
      { id: { [Op.in]: literal(`(SELECT r.atom_library_id FROM revisions r WHERE r.project_id = ${id} AND r.atom_library_id IS NOT NULL)`) } },
    ],
  };
}

function mayDelete(library: AtomLibraryModel, viewer: LibraryViewer): boolean {
  if (library.ownerId === viewer.userId || viewer.siteAdmin) return true;
  return library.scope === 'project' && viewer.role === 'owner';
}

/** Which of these libraries their owners shared with the project. */
async function sharedIdsIn(projectId: number, ids: number[]): Promise<Set<number>> {
  if (ids.length === 0) return new Set();
  const rows = await AtomLibraryShareModel.findAll({ where: { projectId, atomLibraryId: { [Op.in]: ids } }, attributes: ['atomLibraryId'] });
  return new Set(rows.map((r) => r.atomLibraryId));
}

function toSummary(library: AtomLibraryModel, usableIds: Set<number>, viewer: LibraryViewer, sharedIds: Set<number>): AtomLibrarySummary {
  return {
    id: library.id,
    name: library.name,
    material: library.material,
    source: library.source,
    wavelengthNm: library.wavelengthNm,
    periodNm: library.periodNm,
    heightNm: library.heightNm,
    approximate: library.approximate,
    atomCount: library.atomCount,
    scope: library.scope,
    owner: library.owner ? { id: library.owner.id, name: library.owner.name } : null,
    usable: usableIds.has(library.id),
    canDelete: mayDelete(library, viewer),
    sharedHere: sharedIds.has(library.id),
    canShare: library.scope === 'personal' && library.ownerId === viewer.userId && projectRoleAllows(viewer.role, 'design'),
    createdAt: library.createdAt.toISOString(),
  };
}

async function usableIdsIn(projectId: number, ids: number[], userId: number): Promise<Set<number>> {
  if (ids.length === 0) return new Set();
  const rows = await AtomLibraryModel.findAll({ where: { [Op.and]: [{ id: { [Op.in]: ids } }, usableWhere(projectId, userId)] }, attributes: ['id'] });
  return new Set(rows.map((r) => r.id));
}

/** The demo library first, then the project's libraries and the personal ones visible here, newest first. */
export async function listAtomLibraries(projectId: number, viewer: LibraryViewer): Promise<AtomLibrarySummary[]> {
  const libraries = await AtomLibraryModel.findAll({
    where: visibleWhere(projectId, viewer.userId),
    attributes: WITHOUT_ATOMS,
    include: [owner],
    order: [['createdAt', 'DESC'], ['id', 'DESC']],
  });
  const ids = libraries.map((l) => l.id);
  const [usable, shared] = await Promise.all([usableIdsIn(projectId, ids, viewer.userId), sharedIdsIn(projectId, ids)]);
  return [demoSummary(), ...libraries.map((l) => toSummary(l, usable, viewer, shared))];
}

export async function findVisible(projectId: number, id: number, userId: number, withAtoms: boolean): Promise<AtomLibraryModel> {
  const library = await AtomLibraryModel.findOne({
    where: { [Op.and]: [{ id }, visibleWhere(projectId, userId)] },
    attributes: withAtoms ? undefined : WITHOUT_ATOMS,
    include: [owner],
  });
  if (!library) throw new AppError(404, `This project has no atom library ${id}`);
  return library;
}

function engineLibrary(library: AtomLibraryModel): AtomLibrary {
  const out: AtomLibrary = {
    name: library.name,
    lambda: library.wavelengthNm * 1e-9,
    period: library.periodNm * 1e-9,
    height: library.heightNm * 1e-9,
    material: library.material,
    approximate: library.approximate,
    atoms: JSON.parse(library.atoms) as MetaAtom[],
  };
  if (library.source !== null) out.source = library.source;
  return out;
}

export async function getAtomLibrary(projectId: number, id: number | 'demo', viewer: LibraryViewer): Promise<AtomLibraryDetail> {
  if (id === 'demo') return { ...demoSummary(), atoms: toRows(demoLibrary().atoms), usedBy: [] };
  const library = await findVisible(projectId, id, viewer.userId, true);
  const [usable, shared, revisions] = await Promise.all([
    usableIdsIn(projectId, [id], viewer.userId),
    sharedIdsIn(projectId, [id]),
    RevisionModel.findAll({ where: { projectId, atomLibraryId: id }, attributes: ['number'], order: [['number', 'ASC']] }),
  ]);
  return { ...toSummary(library, usable, viewer, shared), atoms: toRows(JSON.parse(library.atoms) as MetaAtom[]), usedBy: revisions.map((r) => r.number) };
}

/** The library as CSV text (the upload format), with a file name. */
export async function atomLibraryCsv(projectId: number, id: number | 'demo', viewer: LibraryViewer): Promise<{ name: string; csv: string }> {
  if (id === 'demo') return { name: 'demo-atom-library.csv', csv: atomLibraryToCsv(demoLibrary()) };
  const library = await findVisible(projectId, id, viewer.userId, true);
  const stem = library.name.replace(/[^\p{L}\p{N}._ -]+/gu, '').trim().slice(0, 100) || `atom-library-${id}`;
  return { name: `${stem}.csv`, csv: atomLibraryToCsv(engineLibrary(library)) };
}

/** Deletes a library nobody uses: the uploader, a site admin, or (for a project library) an owner of the project. */
export async function deleteAtomLibrary(projectId: number, id: number, viewer: LibraryViewer): Promise<void> {
  const library = await findVisible(projectId, id, viewer.userId, false);
  if (!mayDelete(library, viewer)) {
    throw new AppError(403, `Only ${library.owner?.name ?? 'the person who uploaded it'}${library.scope === 'project' ? ' or an owner of the project' : ''} may delete this library`);
  }
  const uses = await RevisionModel.findAll({ where: { atomLibraryId: id }, attributes: ['projectId', 'number'], order: [['number', 'ASC']] });
  if (uses.length > 0) {
    const here = uses.filter((r) => r.projectId === projectId).map((r) => r.number);
    const where = here.length ? `revision${here.length === 1 ? '' : 's'} ${here.join(', ')} of this project` : 'revisions of another project';
    throw new AppError(409, `The library "${library.name}" is used by ${where} (${uses.length} in all); a library that saved revisions use cannot be deleted`);
  }
  await library.destroy();
}

/**
 * Stores a library that `readAtomLibraryCsv` accepted (an upload, or a library build's result), owned by
 * `ownerId`: the project's when `scope` is 'project', else the owner's personal one.
 */
export async function insertAtomLibrary(
  projectId: number,
  ownerId: number,
  library: StorableLibrary,
  scope: AtomLibraryScope,
  transaction?: Transaction,
): Promise<AtomLibraryModel> {
  return AtomLibraryModel.create(
    {
      name: library.name.trim(),
      material: library.material.slice(0, 300),
      source: library.source ? library.source.slice(0, 500) : null,
      wavelengthNm: nm(library.lambda),
      periodNm: nm(library.period),
      heightNm: nm(library.height),
      approximate: library.approximate,
      atomCount: library.atomCount,
      atoms: library.atomsJson,
      scope,
      ownerId,
      projectId: scope === 'project' ? projectId : null,
    },
    { transaction },
  );
}

/** Stores an uploaded library that `readAtomLibraryCsv` accepted. */
export async function createAtomLibrary(
  projectId: number,
  viewer: LibraryViewer,
  library: StorableLibrary,
  scope: AtomLibraryScope,
): Promise<AtomLibraryDetail> {
  const created = await insertAtomLibrary(projectId, viewer.userId, library, scope);
  return getAtomLibrary(projectId, created.id, viewer);
}

/**
 * The stored library a revision of `projectId` may use, with its wavelength and period, or a sentence
 * saying why not.
 */
export async function usableLibrary(projectId: number, id: number, userId: number): Promise<{ library: AtomLibraryModel } | { refusal: string }> {
  const library = await AtomLibraryModel.findOne({ where: { [Op.and]: [{ id }, usableWhere(projectId, userId)] }, attributes: WITHOUT_ATOMS });
  if (library) return { library };
  const exists = await AtomLibraryModel.findByPk(id, { attributes: ['id', 'scope'] });
  if (!exists) return { refusal: `there is no atom library ${id}` };
  return {
    refusal:
      exists.scope === 'project'
        ? `atom library ${id} belongs to another project; upload it to this project to use it`
        : `atom library ${id} is someone else's personal library that its owner has not shared with this project`,
  };
}

/** The engine's form of a stored library, for the run queue. */
export async function libraryForRun(id: number): Promise<AtomLibrary | null> {
  const library = await AtomLibraryModel.findByPk(id);
  return library ? engineLibrary(library) : null;
}
