import { literal, Op, type WhereOptions } from 'sequelize';
import { ATOM_CSV_COLUMNS, atomLibraryToCsv, CsvLimitError, parseAtomLibraryCsv, type AtomLibrary, type CsvLimits, type AtomLibraryMeta, type MetaAtom } from '../../../shared/optics/atoms';
import { demoAtomLibrary } from '../../../shared/optics/demo-library';
import type { ProjectRole } from '../../../shared/roles';
import {
  type AtomCsvProblem,
  type AtomLibraryDetail,
  type AtomLibraryScope,
  type AtomLibrarySummary,
  type AtomRow,
  type CreateAtomLibraryInput,
} from '../../../shared/schemas/atom-libraries';
import { AppError } from '../../lib/app-error';
import { RevisionModel } from '../revisions/revision.model';
import { UserModel } from '../users/user.model';
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
    createdAt: null,
  };
}

/** Project libraries of the project, and personal libraries of anyone who may design in it (a site admin may design anywhere). */
function usableWhere(projectId: number): WhereOptions {
  const id = Number(projectId);
  return {
    [Op.or]: [
      { scope: 'project', projectId: id },
      {
        scope: 'personal',
        ownerId: {
          [Op.in]: literal(
            `(SELECT m.user_id FROM project_members m WHERE m.project_id = ${id} AND m.role IN ('owner', 'designer') UNION SELECT u.id FROM users u WHERE u.site_role = 'admin')`,
          ),
        },
      },
    ],
  };
}

/** Usable here, or used by a revision of this project (then readable, though perhaps no longer usable). */
function visibleWhere(projectId: number): WhereOptions {
  const id = Number(projectId);
  return {
    [Op.or]: [usableWhere(id), { id: { [Op.in]: literal(`(SELECT r.atom_library_id FROM revisions r WHERE r.project_id = ${id} AND r.atom_library_id IS NOT NULL)`) } }],
  };
}

function mayDelete(library: AtomLibraryModel, viewer: LibraryViewer): boolean {
  if (library.ownerId === viewer.userId || viewer.siteAdmin) return true;
  return library.scope === 'project' && viewer.role === 'owner';
}

function toSummary(library: AtomLibraryModel, usableIds: Set<number>, viewer: LibraryViewer): AtomLibrarySummary {
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
    createdAt: library.createdAt.toISOString(),
  };
}

async function usableIdsIn(projectId: number, ids: number[]): Promise<Set<number>> {
  if (ids.length === 0) return new Set();
  const rows = await AtomLibraryModel.findAll({ where: { [Op.and]: [{ id: { [Op.in]: ids } }, usableWhere(projectId)] }, attributes: ['id'] });
  return new Set(rows.map((r) => r.id));
}

/** The demo library first, then the project's libraries and the personal ones visible here, newest first. */
export async function listAtomLibraries(projectId: number, viewer: LibraryViewer): Promise<AtomLibrarySummary[]> {
  const libraries = await AtomLibraryModel.findAll({
    where: visibleWhere(projectId),
    attributes: WITHOUT_ATOMS,
    include: [owner],
    order: [['createdAt', 'DESC'], ['id', 'DESC']],
  });
  const usable = await usableIdsIn(projectId, libraries.map((l) => l.id));
  return [demoSummary(), ...libraries.map((l) => toSummary(l, usable, viewer))];
}

async function findVisible(projectId: number, id: number, withAtoms: boolean): Promise<AtomLibraryModel> {
  const library = await AtomLibraryModel.findOne({
    where: { [Op.and]: [{ id }, visibleWhere(projectId)] },
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
  const library = await findVisible(projectId, id, true);
  const [usable, revisions] = await Promise.all([
    usableIdsIn(projectId, [id]),
    RevisionModel.findAll({ where: { projectId, atomLibraryId: id }, attributes: ['number'], order: [['number', 'ASC']] }),
  ]);
  return { ...toSummary(library, usable, viewer), atoms: toRows(JSON.parse(library.atoms) as MetaAtom[]), usedBy: revisions.map((r) => r.number) };
}

/** The library as CSV text (the upload format), with a file name. */
export async function atomLibraryCsv(projectId: number, id: number | 'demo'): Promise<{ name: string; csv: string }> {
  if (id === 'demo') return { name: 'demo-atom-library.csv', csv: atomLibraryToCsv(demoLibrary()) };
  const library = await findVisible(projectId, id, true);
  const stem = library.name.replace(/[^\p{L}\p{N}._ -]+/gu, '').trim().slice(0, 100) || `atom-library-${id}`;
  return { name: `${stem}.csv`, csv: atomLibraryToCsv(engineLibrary(library)) };
}

/** Deletes a library nobody uses: the uploader, a site admin, or (for a project library) an owner of the project. */
export async function deleteAtomLibrary(projectId: number, id: number, viewer: LibraryViewer): Promise<void> {
  const library = await findVisible(projectId, id, false);
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

export interface CsvReading {
  library: AtomLibrary;
  /** The first problems (at most `limits.maxIssues`). */
  problems: AtomCsvProblem[];
  /** All problems, also those not listed. */
  problemCount: number;
  warnings: string[];
}

/** Limits of an uploaded library file, from the configuration. */
export interface CsvUploadLimits extends CsvLimits {
  maxBytes: number;
}

function problemOf(issue: { line?: number; column?: string; field: string; atomId?: string; message: string }): AtomCsvProblem {
  return { row: issue.line ?? null, column: issue.column ?? issue.field, atomId: issue.atomId || null, message: issue.message };
}

/** The reading limit a file exceeded, as the answer that says what to change (413 for too many rows). */
function limitError(error: CsvLimitError): AppError {
  const fix =
    error.limit === 'rows'
      ? 'split the library into smaller files or remove unused atoms'
      : error.limit === 'columns'
        ? `keep the ${ATOM_CSV_COLUMNS.length} documented columns (atom_id … phase_y_rad)`
        : 'check that the file is the atom table saved as CSV, one atom per line';
  return new AppError(error.limit === 'rows' ? 413 : 400, `The atom library file cannot be read: ${error.message}; ${fix}.`, { file: `${error.limit} limit` });
}

/**
 * Reads an uploaded library CSV: form fields override the `# key: value` lines; without a period or height
 * line the first atom's period and the first pillar's height are taken. Every problem names the line of
 * the file and the column. Rows, columns and line length are limited while reading (AppError 413/400 at
 * the first excess); problems are listed up to `limits.maxIssues` and counted beyond.
 */
export function readAtomLibraryCsv(bytes: Buffer, input: CreateAtomLibraryInput, limits: CsvUploadLimits): CsvReading {
  const fileProblem = (column: string, message: string): CsvReading => ({
    library: { name: '', lambda: NaN, period: NaN, height: NaN, material: '', approximate: true, atoms: [] },
    problems: [{ row: null, column, atomId: null, message }],
    problemCount: 1,
    warnings: [],
  });
  if (bytes.length === 0) return fileProblem('file', 'the file is empty');
  if (bytes.length > limits.maxBytes) {
    throw new AppError(413, `The library file is larger than ${limits.maxBytes / 1024 / 1024} MiB; split it or remove unused atoms`, { file: 'too large' });
  }
  if (bytes.includes(0)) return fileProblem('file', 'the file is not text (it holds NUL bytes); save the table as CSV');
  const text = bytes.toString('utf8').replace(/^\uFEFF/, '');
  if (text.includes('\uFFFD')) return fileProblem('file', 'the file is not UTF-8 text; save the table as CSV in UTF-8');

  const meta: Partial<AtomLibraryMeta> = {};
  if (input.name) meta.name = input.name;
  if (input.material) meta.material = input.material;
  if (input.wavelengthNm !== undefined) meta.lambda = input.wavelengthNm * 1e-9;
  if (input.periodNm !== undefined) meta.period = input.periodNm * 1e-9;
  if (input.heightNm !== undefined) meta.height = input.heightNm * 1e-9;
  const parse = (extra: Partial<AtomLibraryMeta>) => {
    try {
      return parseAtomLibraryCsv(text, { ...meta, ...extra }, { limits });
    } catch (error) {
      if (error instanceof CsvLimitError) throw limitError(error);
      throw error;
    }
  };
  let parsed = parse({});
  const atoms = parsed.library.atoms;
  const fallback: Partial<AtomLibraryMeta> = {};
  if (!Number.isFinite(parsed.library.period)) {
    const period = atoms.find((a) => Number.isFinite(a.period) && a.period > 0)?.period;
    if (period !== undefined) fallback.period = period;
  }
  if (!Number.isFinite(parsed.library.height)) {
    const height = atoms.find((a) => a.shape === 'rect' && Number.isFinite(a.height) && a.height > 0)?.height;
    if (height !== undefined) fallback.height = height;
  }
  if (Object.keys(fallback).length > 0) parsed = parse(fallback);

  const { library } = parsed;
  const problems: AtomCsvProblem[] = [];
  let problemCount = 0;
  const add = (problem: AtomCsvProblem) => {
    problemCount++;
    if (problems.length < limits.maxIssues) problems.push(problem);
  };
  if (library.name.trim() === '') add({ row: null, column: 'name', atomId: null, message: 'the library has no name: fill in the name field or add a line "# name: …"' });
  if (!Number.isFinite(library.lambda)) {
    add({
      row: null,
      column: 'design_wavelength_nm',
      atomId: null,
      message: 'the design wavelength is missing or not a number: fill in the wavelength field or add a line "# design_wavelength_nm: 633"',
    });
  }
  if (library.name.length > 120) add({ row: null, column: 'name', atomId: null, message: 'the name is longer than 120 characters' });
  const handled = new Set(['name', 'lambda']);
  const listedErrors = parsed.issues.filter((i) => i.severity === 'error');
  for (const issue of listedErrors) {
    if (!(issue.row === 0 && handled.has(issue.field))) add(problemOf(issue));
  }
  // The parser's errors beyond the ones it listed are counted only.
  problemCount += parsed.errorCount - listedErrors.length;
  const warnings = parsed.issues.filter((i) => i.severity === 'warning').map((i) => i.message);
  return { library, problems, problemCount, warnings };
}

/** Stores a library that `readAtomLibraryCsv` accepted. */
export async function createAtomLibrary(
  projectId: number,
  viewer: LibraryViewer,
  library: AtomLibrary,
  scope: AtomLibraryScope,
): Promise<AtomLibraryDetail> {
  const created = await AtomLibraryModel.create({
    name: library.name.trim(),
    material: library.material.slice(0, 300),
    source: library.source ? library.source.slice(0, 500) : null,
    wavelengthNm: nm(library.lambda),
    periodNm: nm(library.period),
    heightNm: nm(library.height),
    approximate: library.approximate,
    atomCount: library.atoms.length,
    atoms: JSON.stringify(library.atoms),
    scope,
    ownerId: viewer.userId,
    projectId: scope === 'project' ? projectId : null,
  });
  return getAtomLibrary(projectId, created.id, viewer);
}

/**
 * The stored library a revision of `projectId` may use, with its wavelength and period, or a sentence
 * saying why not.
 */
export async function usableLibrary(projectId: number, id: number): Promise<{ library: AtomLibraryModel } | { refusal: string }> {
  const library = await AtomLibraryModel.findOne({ where: { [Op.and]: [{ id }, usableWhere(projectId)] }, attributes: WITHOUT_ATOMS });
  if (library) return { library };
  const exists = await AtomLibraryModel.findByPk(id, { attributes: ['id', 'scope'] });
  if (!exists) return { refusal: `there is no atom library ${id}` };
  return {
    refusal:
      exists.scope === 'project'
        ? `atom library ${id} belongs to another project; upload it to this project to use it`
        : `atom library ${id} is a personal library of someone who cannot design in this project`,
  };
}

/** The engine's form of a stored library, for the run queue. */
export async function libraryForRun(id: number): Promise<AtomLibrary | null> {
  const library = await AtomLibraryModel.findByPk(id);
  return library ? engineLibrary(library) : null;
}
