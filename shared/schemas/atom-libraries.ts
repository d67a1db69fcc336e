/**
 * Atom libraries kept on the server: what the API sends and accepts, the CSV columns explained to people,
 * and the rule that a design's wavelength and period must match its library's.
 */
import { z } from 'zod';

/** 'personal': seen by its owner alone, in every project, until they share it with a project; 'project': kept in one project. */
export const ATOM_LIBRARY_SCOPES = ['personal', 'project'] as const;
export type AtomLibraryScope = (typeof ATOM_LIBRARY_SCOPES)[number];

export const ATOM_LIBRARY_LIMITS = {
  /** Largest CSV accepted, bytes. */
  maxBytes: 4 * 1024 * 1024,
  /** Most atoms one library may hold. */
  maxAtoms: 20_000,
} as const;

/**
 * Largest relative difference between a design's wavelength (or period) and its library's that still
 * counts as the same: 0.1 % (0.6 nm at 633 nm). A library characterised at another wavelength or period
 * gives other transmissions, so the design is refused rather than silently mapped.
 */
export const LIBRARY_MATCH_TOLERANCE = 1e-3;

/** The CSV columns, in order, with their unit and meaning: the upload page and the README show these. */
export const ATOM_CSV_COLUMN_DOCS = [
  { column: 'atom_id', unit: '—', meaning: 'A name of the atom, unique in the library', example: 'w180-l320' },
  { column: 'shape', unit: '—', meaning: "'rect' for a rectangular pillar, 'empty' for a bare cell (optional column; default rect)", example: 'rect' },
  { column: 'width_nm', unit: 'nm', meaning: "Pillar size along the atom's x axis (0 for empty)", example: '180' },
  { column: 'length_nm', unit: 'nm', meaning: "Pillar size along the atom's y axis (0 for empty)", example: '320' },
  { column: 'height_nm', unit: 'nm', meaning: 'Pillar height', example: '1200' },
  { column: 'period_nm', unit: 'nm', meaning: 'Lattice period the atom was characterised in (same for every atom)', example: '450' },
  { column: 't_x', unit: '0…1', meaning: 'Amplitude transmission for x-polarized light in the atom frame', example: '0.93' },
  { column: 'phase_x_rad', unit: 'rad', meaning: 'Transmission phase α_x for x-polarized light', example: '2.41' },
  { column: 't_y', unit: '0…1', meaning: 'Amplitude transmission for y-polarized light in the atom frame', example: '0.91' },
  { column: 'phase_y_rad', unit: 'rad', meaning: 'Transmission phase α_y for y-polarized light', example: '4.87' },
] as const;

/** Metadata lines of the CSV (`# key: value`); the upload form's fields override them. */
export const ATOM_CSV_METADATA_DOCS = [
  { key: 'name', meaning: 'Name of the library', example: 'TiO₂ pillars, 532 nm' },
  { key: 'design_wavelength_nm', meaning: 'Wavelength the transmissions were computed or measured at, nm (required)', example: '633' },
  { key: 'period_nm', meaning: 'Lattice period, nm (default: the atoms’ period_nm)', example: '450' },
  { key: 'height_nm', meaning: 'Nominal pillar height, nm (default: the first pillar’s height)', example: '1200' },
  { key: 'material', meaning: 'Material and platform note', example: 'Si₃N₄ on fused silica, in air' },
  { key: 'approximate', meaning: "'false' for full-wave or measured data; anything else (or no line) marks the library approximate", example: 'false' },
  {
    key: 'source',
    meaning:
      'Where the numbers come from. Words “light from the substrate side (substrate n = 1.4570, superstrate n = 1.0000)”, as the RCWA builder writes them, tell the side the light entered and the indices (for the light-side and lattice-diffraction checks)',
    example: 'RCWA sweep, 2026-11; light from the substrate side (substrate n = 1.4570, superstrate n = 1.0000)',
  },
] as const;

/** A short valid-looking example of the format (header, metadata, two atoms). */
export const ATOM_CSV_EXAMPLE = [
  'atom_id,shape,width_nm,length_nm,height_nm,period_nm,t_x,phase_x_rad,t_y,phase_y_rad',
  '# name: Lab Si₃N₄ pillars',
  '# design_wavelength_nm: 633',
  '# period_nm: 450',
  '# height_nm: 1200',
  '# material: Si₃N₄ on fused silica, in air',
  '# approximate: false',
  'empty,empty,0,0,0,450,0.98,0,0.98,0',
  'w180-l320,rect,180,320,1200,450,0.93,2.41,0.91,4.87',
].join('\n');

export interface AtomLibrarySummary {
  /** 'demo' for the built-in approximate library, otherwise the stored library's number. */
  id: number | 'demo';
  name: string;
  material: string;
  source: string | null;
  wavelengthNm: number;
  periodNm: number;
  heightNm: number;
  approximate: boolean;
  atomCount: number;
  scope: AtomLibraryScope | 'demo';
  owner: { id: number; name: string } | null;
  /** True when a revision of this project may refer to it. */
  usable: boolean;
  /** True when the person asking may delete it (it is still refused while a revision uses it). */
  canDelete: boolean;
  /** A personal library its owner shared with this project (every member sees it, designers may use it). */
  sharedHere: boolean;
  /** True when the person asking owns this personal library and may share it here or stop sharing it. */
  canShare: boolean;
  createdAt: string | null;
}

/** One atom as the API sends it: geometry in nm, phases in radians. */
export interface AtomRow {
  id: string;
  shape: 'rect' | 'empty';
  widthNm: number;
  lengthNm: number;
  heightNm: number;
  tx: number;
  alphaX: number;
  ty: number;
  alphaY: number;
}

export interface AtomLibraryDetail extends AtomLibrarySummary {
  atoms: AtomRow[];
  /** Revisions of this project that use the library. */
  usedBy: number[];
}

/** One problem of an uploaded CSV: `row` is the line of the file (header and # lines count), null for the file as a whole. */
export interface AtomCsvProblem {
  row: number | null;
  column: string;
  atomId: string | null;
  message: string;
}

const optionalNm = (what: string) =>
  z
    .union([z.literal(''), z.coerce.number({ error: `${what} must be a number of nanometres` })])
    .optional()
    .transform((v) => (v === '' ? undefined : v))
    .refine((v) => v === undefined || (Number.isFinite(v) && v > 0), `${what} must be a positive number of nanometres`);

/** The form fields sent with an atom library's `file`; empty fields fall back to the CSV's metadata lines. */
export const createAtomLibrarySchema = z.object({
  name: z.string().trim().max(120, 'name must be at most 120 characters').optional().default(''),
  scope: z.enum(ATOM_LIBRARY_SCOPES, { error: `scope must be one of ${ATOM_LIBRARY_SCOPES.join(', ')}` }),
  material: z.string().trim().max(300, 'material must be at most 300 characters').optional().default(''),
  wavelengthNm: optionalNm('wavelengthNm'),
  periodNm: optionalNm('periodNm'),
  heightNm: optionalNm('heightNm'),
});
export type CreateAtomLibraryInput = z.infer<typeof createAtomLibrarySchema>;

/**
 * Why a library does not fit a design: one sentence per mismatch (wavelength, period), naming both values;
 * empty when both agree within LIBRARY_MATCH_TOLERANCE.
 * Example: libraryMismatches({ wavelengthNm: 532, periodNm: 450 }, { wavelengthNm: 633, periodNm: 450 })
 * → ['the design uses a wavelength of 532 nm, the library was made for 633 nm'].
 */
export function libraryMismatches(
  design: { wavelengthNm: number; periodNm: number },
  library: { wavelengthNm: number; periodNm: number },
): string[] {
  const differs = (a: number, b: number) => Math.abs(a - b) > LIBRARY_MATCH_TOLERANCE * Math.abs(b);
  const nm = (v: number) => `${Number(v.toFixed(3))} nm`;
  const out: string[] = [];
  if (differs(design.wavelengthNm, library.wavelengthNm)) {
    out.push(`the design uses a wavelength of ${nm(design.wavelengthNm)}, the library was made for ${nm(library.wavelengthNm)}`);
  }
  if (differs(design.periodNm, library.periodNm)) {
    out.push(`the design uses a period of ${nm(design.periodNm)}, the library was made for ${nm(library.periodNm)}`);
  }
  return out;
}
