/**
 * Reading a design file and everything it refers to, for the command line: the design (validated with the
 * shared schema, defaults filled in), its pictures (PNG/JPEG → grayscale), custom phase maps (.npy N×N
 * float, or grayscale PNG/JPEG → 0…2π) and the atom library (the approximate demo library, or a CSV file).
 * File references are relative to the design file's folder; demo pictures come from the repository's
 * demo-assets (shared/demo-assets.ts).
 */
import { readFile } from 'node:fs/promises';
import { dirname, extname, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { DEMO_IMAGE_FILES } from '../../shared/demo-assets';
import { parseAtomLibraryCsv, type AtomLibrary } from '../../shared/optics/atoms';
import { demoAtomLibrary } from '../../shared/optics/demo-library';
import { designCellNotes } from '../../shared/optics/library-builder';
import { decodeNpy } from '../../shared/optics/npy-decode';
import type { DesignResources } from '../../shared/optics/pipeline';
import type { GrayImage } from '../../shared/optics/target';
import { designSchema, describeDesignIssues, type AssetRef, type Design } from '../../shared/schemas/design';
import { readGrayImage } from './png';

/** The repository root, from this file's own location (server/cli/). */
export const REPO_ROOT = fileURLToPath(new URL('../../', import.meta.url));

/** A problem with the user's input (design file, referenced files): reported without a stack trace, exit code 2. */
export class InputError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'InputError';
  }
}

/** Reads and validates a design file. Throws InputError naming each offending field. */
export async function loadDesignFile(path: string): Promise<Design> {
  let text: string;
  try {
    text = await readFile(path, 'utf8');
  } catch (error) {
    throw new InputError(`${path}: cannot read the design file (${(error as NodeJS.ErrnoException).code ?? (error as Error).message})`);
  }
  let json: unknown;
  try {
    json = JSON.parse(text);
  } catch (error) {
    throw new InputError(`${path}: not valid JSON (${(error as Error).message})`);
  }
  const parsed = designSchema.safeParse(json);
  if (!parsed.success) {
    throw new InputError(`${path}: the design is not valid:\n${describeDesignIssues(parsed.error).map((line) => `  ${line}`).join('\n')}`);
  }
  return parsed.data;
}

const refKey = (ref: AssetRef): string => JSON.stringify(ref);

async function readImageRef(ref: AssetRef, folder: string, field: string): Promise<GrayImage> {
  const file = assetPath(ref, folder, field);
  try {
    return await readGrayImage(file);
  } catch (error) {
    throw new InputError(`${field}: cannot read the picture ${file} (${(error as Error).message})`);
  }
}

function assetPath(ref: AssetRef, folder: string, field: string): string {
  switch (ref.source) {
    case 'file':
      return resolve(folder, ref.path);
    case 'demo':
      return resolve(REPO_ROOT, DEMO_IMAGE_FILES[ref.name]);
    case 'upload':
      throw new InputError(`${field}: uploads (id ${ref.id}) live on the Phasewright server; on the command line use { "source": "file", "path": … } or a demo picture`);
  }
}

/**
 * A custom phase map: .npy of shape (N, N) with float, int or uint values in radians, or a grayscale
 * picture whose gray level g (0…255) means 2π·g/256 (so 256 levels split the circle evenly).
 */
async function readPhaseMapRef(ref: AssetRef, folder: string, field: string, n: number): Promise<Float64Array> {
  const file = assetPath(ref, folder, field);
  if (extname(file).toLowerCase() === '.npy') {
    let bytes: Buffer;
    try {
      bytes = await readFile(file);
    } catch (error) {
      throw new InputError(`${field}: cannot read ${file} (${(error as NodeJS.ErrnoException).code ?? (error as Error).message})`);
    }
    let decoded;
    try {
      decoded = decodeNpy(new Uint8Array(bytes.buffer, bytes.byteOffset, bytes.byteLength));
    } catch (error) {
      throw new InputError(`${field}: ${file}: ${(error as Error).message}`);
    }
    if (decoded.shape.length !== 2 || decoded.shape[0] !== n || decoded.shape[1] !== n) {
      throw new InputError(`${field}: ${file} has shape (${decoded.shape.join(', ')}), the design needs (${n}, ${n})`);
    }
    const phase = Float64Array.from(decoded.data);
    const bad = phase.findIndex((v) => !Number.isFinite(v));
    if (bad >= 0) throw new InputError(`${field}: ${file} has a non-finite value at row ${Math.floor(bad / n)}, column ${bad % n}`);
    return phase;
  }
  const image = await readImageRef(ref, folder, field);
  if (image.width !== n || image.height !== n) throw new InputError(`${field}: ${file} is ${image.width}×${image.height} pixels, the design needs ${n}×${n}`);
  // A picture's top row is the largest y (README "Picture convention"); the .npy above is [iy, ix] as it is.
  const phase = new Float64Array(n * n);
  for (let row = 0; row < n; row++) {
    for (let ix = 0; ix < n; ix++) phase[(n - 1 - row) * n + ix] = (2 * Math.PI * (image.pixels[row * n + ix] as number)) / 256;
  }
  return phase;
}

/** The atom library of the design: the demo library made for the design's wavelength and period, or a CSV file. */
async function readLibrary(design: Design, folder: string): Promise<{ library: AtomLibrary; warnings: string[] }> {
  const ref = design.atomLibrary;
  const lambda = design.setup.wavelengthNm * 1e-9;
  const period = design.setup.periodNm * 1e-9;
  const warnings: string[] = [];
  let library: AtomLibrary;
  if (ref.source === 'demo') {
    try {
      library = demoAtomLibrary({ lambda, period });
    } catch (error) {
      throw new InputError(`atomLibrary: the demo library cannot be made for this wavelength and period (${(error as Error).message})`);
    }
    if (library.atoms.length < 2) throw new InputError(`atomLibrary: at a period of ${design.setup.periodNm} nm the demo library holds no pillars; use a larger period or a library file`);
  } else if (ref.source === 'file') {
    const file = resolve(folder, ref.path);
    let text: string;
    try {
      text = await readFile(file, 'utf8');
    } catch (error) {
      throw new InputError(`atomLibrary.path: cannot read ${file} (${(error as NodeJS.ErrnoException).code ?? (error as Error).message})`);
    }
    const parsed = parseAtomLibraryCsv(text);
    const errors = parsed.issues.filter((i) => i.severity === 'error');
    if (errors.length) {
      const shown = errors.slice(0, 10).map((i) => `  ${i.line ? `line ${i.line}: ` : ''}${i.message}`);
      if (errors.length > 10) shown.push(`  … and ${errors.length - 10} more`);
      throw new InputError(`atomLibrary.path: ${file} is not a usable atom library:\n${shown.join('\n')}`);
    }
    for (const issue of parsed.issues.filter((i) => i.severity === 'warning')) warnings.push(`atom library: ${issue.message}`);
    library = parsed.library;
    if (Math.abs(library.period - period) > 1e-6 * period) {
      throw new InputError(`atomLibrary.path: the library was made for a period of ${(library.period * 1e9).toFixed(1)} nm, the design uses ${design.setup.periodNm} nm (setup.periodNm)`);
    }
    if (Math.abs(library.lambda - lambda) > 1e-6 * lambda) {
      warnings.push(`atom library: made for ${(library.lambda * 1e9).toFixed(1)} nm, the design uses ${design.setup.wavelengthNm} nm`);
    }
  } else {
    throw new InputError(`atomLibrary: library ${ref.id} lives on the Phasewright server; on the command line use { "source": "demo" } or { "source": "file", "path": … }`);
  }
  if (library.approximate) warnings.push(`atom library "${library.name}" is APPROXIMATE (${library.source ?? 'no full-wave data'})`);
  warnings.push(...cellWarnings(design, library));
  return { library, warnings };
}

/** The light side against the library's, the lattice's own diffraction, and the layout's view for light onto the pillars. */
export function cellWarnings(design: Design, library: AtomLibrary): string[] {
  const warnings: string[] = [];
  const notes = designCellNotes(design.setup, library);
  if (notes.sideMismatch) warnings.push(`atom library "${library.name}": ${notes.sideMismatch}`);
  for (const d of notes.diffraction) warnings.push(`lattice diffraction: ${d.message}`);
  if (design.setup.lightFrom === 'superstrate') {
    warnings.push(
      'setup.lightFrom: the light falls onto the pillars, so the previews and the layout files are seen from the substrate side (where the light goes); ' +
        'a mask is drawn seen from above the pillars: mirror the layout left–right (x → −x) for the mask, or the device projects its pictures mirrored (a circular pair also exchanges its two handednesses)',
    );
  }
  return warnings;
}

/** Resolves every file a design refers to (relative to `designPath`'s folder) into engine resources. */
export async function loadDesignResources(design: Design, designPath: string): Promise<{ resources: DesignResources; warnings: string[] }> {
  const folder = dirname(resolve(designPath));
  const images = new Map<string, GrayImage>();
  const phaseMaps = new Map<string, Float64Array>();
  for (const id of ['a', 'b'] as const) {
    for (const [index, term] of design.channels[id].terms.entries()) {
      const field = `channels.${id}.terms.${index}`;
      if (term.kind === 'hologram' && !images.has(refKey(term.image))) images.set(refKey(term.image), await readImageRef(term.image, folder, `${field}.image`));
      if (term.kind === 'custom' && !phaseMaps.has(refKey(term.phaseMap))) {
        phaseMaps.set(refKey(term.phaseMap), await readPhaseMapRef(term.phaseMap, folder, `${field}.phaseMap`, design.setup.cells));
      }
    }
  }
  const { library, warnings } = await readLibrary(design, folder);
  const lookup = <T>(map: Map<string, T>, ref: AssetRef): T => {
    const value = map.get(refKey(ref));
    if (value === undefined) throw new RangeError(`Asset ${refKey(ref)} was not loaded`);
    return value;
  };
  return {
    resources: { images: (ref) => lookup(images, ref), phaseMaps: (ref) => lookup(phaseMaps, ref), library },
    warnings,
  };
}
