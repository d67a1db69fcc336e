/**
 * Reading an uploaded atom-library CSV into a library and the problems that stop it, with the reading limits
 * of the configuration. Pure (no database): runs on the input worker (server/lib/input-worker.ts).
 */
import { ATOM_CSV_COLUMNS, CsvLimitError, parseAtomLibraryCsv, type AtomLibraryMeta, type CsvLimits } from '../../../shared/optics/atoms';
import type { AtomCsvProblem, CreateAtomLibraryInput } from '../../../shared/schemas/atom-libraries';
import { AppError } from '../../lib/app-error';

/** A library read from CSV as it is stored: its facts, and its atoms as JSON text (cheap to pass between threads). */
export interface StorableLibrary extends AtomLibraryMeta {
  atomCount: number;
  /** MetaAtom[] as JSON. */
  atomsJson: string;
}

export interface CsvReading {
  /** The library, when there are no problems. */
  library: StorableLibrary | null;
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
    library: null,
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
  const { atoms: readAtoms, ...facts } = library;
  const storable = problemCount === 0 ? { ...facts, atomCount: readAtoms.length, atomsJson: JSON.stringify(readAtoms) } : null;
  return { library: storable, problems, problemCount, warnings };
}
