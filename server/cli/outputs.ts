/**
 * The files of a finished run, written into one folder:
 * - numpy arrays (NEP 1 .npy, C order): phase_a/phase_b (channel phases, rad, float64), delta_x/delta_y/theta
 *   (ideal cell parameters, rad, float64), atom_index (int32), farfield_a/farfield_b (realized far-field
 *   intensity under inputs A and B, float32, fftshifted: zero order at (N/2, N/2));
 * - atoms.csv (the library used), design.json (the validated design, defaults filled in), metrics.json,
 *   drc.json (design rules used, violation counts, the first violations);
 * - layout.gds, streamed chunk by chunk (gdsii.ts), never whole in memory; structures only for the atoms used;
 * - PNG previews (previews.ts): the maps (phases, atom index, rotation) and the far field under each input as
 *   a total and split into output polarization components (farfield_<input>.png, _out-a.png, _out-b.png,
 *   _x.png, _y.png), each input's pictures on one scale.
 * Three groups, so that a helper thread can write the first two while the engine goes on (run-threads.ts): the
 * layout files (arrays up to the atom index, atoms.csv, layout.gds, the maps), fixed once the atoms are mapped;
 * the far-field previews, once the far fields are simulated; the rest (far-field arrays, records, beam and
 * image-plane previews) at the end.
 */
import { open, writeFile } from 'node:fs/promises';
import { join } from 'node:path';
import { atomLibraryToCsv, LIGHT_SIDE_LABELS, type AtomLibrary } from '../../shared/optics/atoms';
import { gdsiiChunks } from '../../shared/optics/gdsii';
import { npyChunks, type NpyArray } from '../../shared/optics/npy';
import { CHANNEL_IDS, type ChannelId, type DesignRun, type RunFarFields, type RunLayout } from '../../shared/optics/pipeline';
import { drcRecord } from './drc-record';
import { beamPreviewDataOf, farFieldPreviewDataOf, mapPreviewPainters, resultPreviewPainters, pictureFramesOf, writePainted, type WrittenFile } from './previews';
import { farFieldTiledPictures, mapTiledPictures, writeTilePyramids, type TileOptions } from './tiles';

export type { WrittenFile } from './previews';

/** Streams chunks into a new file; returns the number of bytes written. */
async function writeChunks(path: string, chunks: Iterable<Uint8Array>): Promise<number> {
  const file = await open(path, 'w');
  let bytes = 0;
  try {
    for (const chunk of chunks) {
      await file.write(chunk);
      bytes += chunk.length;
    }
  } finally {
    await file.close();
  }
  return bytes;
}

function jsonNumbers(values: ArrayLike<number>): (number | null)[] {
  return Array.from(values, (v) => (Number.isFinite(v) ? v : null));
}

/** The metrics.json record of a run. */
export function metricsRecord(run: DesignRun): Record<string, unknown> {
  const convergence = {} as Record<ChannelId, unknown>;
  const beams = {} as Record<ChannelId, unknown>;
  const foci = {} as Record<ChannelId, unknown>;
  for (const c of CHANNEL_IDS) {
    const ch = run.channels[c];
    convergence[c] = ch.retrieval
      ? {
          algorithm: ch.plan.hologram!.options.algorithm,
          fourierError: jsonNumbers(ch.retrieval.fourierError),
          windowError: jsonNumbers(ch.retrieval.windowError),
          windowEfficiency: jsonNumbers(ch.retrieval.windowEfficiency),
        }
      : null;
    beams[c] = ch.beam
      ? {
          zM: jsonNumbers(ch.beam.z),
          lineIntensity: jsonNumbers(ch.beam.lineIntensity),
          lineIntensityMeaning: ch.beam.spec.charge === 0 ? 'on-axis intensity' : 'mean intensity on the ring of the formula radius',
          profile: {
            zM: ch.beam.profile.z,
            radiusM: jsonNumbers(ch.beam.profile.radius),
            measured: jsonNumbers(ch.beam.profile.measured),
            analytic: jsonNumbers(ch.beam.profile.analytic),
          },
        }
      : null;
    foci[c] = ch.focus ? { radiusM: jsonNumbers(ch.focus.profile.radius), measured: jsonNumbers(ch.focus.profile.measured) } : null;
  }
  const beamLike = CHANNEL_IDS.some((c) => run.channels[c].beam || run.channels[c].focus);
  const notes = [
    'Handedness: optics convention of Born & Wolf, time dependence exp(−iωt): right-circular = [1, −i]/√2 turns clockwise seen by the receiver.',
    'Far fields: fftshifted (zero order at pixel (N/2, N/2)), unitary (sum = power), direction-cosine step λ/(N·P), evanescent pixels zero.',
    'Pictures: x (u) to the right, y (v) up, seen facing the device from the side the light goes to; arrays are [iy, ix] with iy growing with y, so numpy shows them this way with imshow(origin="lower").',
  ];
  notes.push(`Light enters ${LIGHT_SIDE_LABELS[run.design.setup.lightFrom]} (setup.lightFrom).`);
  if (run.library.approximate) notes.push(`The atom library "${run.library.name}" is APPROXIMATE: ${run.library.source ?? 'not from full-wave data'}.`);
  if (beamLike) {
    notes.push(
      'Laser safety: focused and Bessel beams concentrate power along a line or in a spot. Follow ANSI Z136.1 / IEC 60825-1 and your institution’s laser safety officer.',
    );
  }
  notes.push('Fabrication uses hazardous chemistry: follow your cleanroom’s own procedures.');
  return {
    format: 'phasewright-metrics/1',
    design: run.design.name,
    grid: { cells: run.grid.n, periodM: run.grid.period, wavelengthM: run.grid.lambda, lightFrom: run.design.setup.lightFrom },
    library: { name: run.library.name, atoms: run.library.atoms.length, approximate: run.library.approximate, source: run.library.source ?? null },
    inputs: { a: run.inputs.a, b: run.inputs.b, extra: run.inputs.extra },
    inputsMeaning: 'unit Jones vectors [[x.re, x.im], [y.re, y.im]] of input A, its orthogonal partner B, and the extra preview input',
    analyser: { a: run.analyser[0], b: run.analyser[1], meaning: 'output states λA*, λB* the device sends A and B to' },
    metrics: run.metrics,
    convergence,
    beams,
    foci,
    designRuleViolations: run.drc.violations.slice(0, 50),
    designRuleViolationsTruncated: run.drc.violations.length > 50 || run.drc.truncated,
    timingsMs: run.timings,
    pictures: pictureFramesOf(run),
    notes,
  };
}

/** What the layout files are made of: plain data, so it can be handed to a worker thread. */
export interface LayoutFilesData {
  n: number;
  period: number;
  layer: number;
  datatype: number;
  phases: Record<ChannelId, Float64Array>;
  deltaX: Float64Array;
  deltaY: Float64Array;
  /** Ideal rotation θ of each cell (theta.npy, rotation.png). */
  theta: Float64Array;
  atomIndex: Int32Array;
  /** Placement rotation of the chosen atom (the layout). */
  placement: Float64Array;
  library: AtomLibrary;
}

/** The layout files' data of a run, or of a layout just mapped (no copies). */
export function layoutFilesDataOf(layout: RunLayout): LayoutFilesData {
  return {
    n: layout.grid.n,
    period: layout.grid.period,
    layer: layout.design.layout.layer,
    datatype: layout.design.layout.datatype,
    phases: layout.phases,
    deltaX: layout.decomposition.deltaX,
    deltaY: layout.decomposition.deltaY,
    theta: layout.decomposition.theta,
    atomIndex: layout.mapping.atomIndex,
    placement: layout.mapping.theta,
    library: layout.library,
  };
}

/** Another thread that writes files of a run (output-helper.ts). */
export interface OutputHelper {
  writeLayout(dir: string, data: LayoutFilesData, tiles?: TileOptions | null): Promise<WrittenFile[]>;
  writeFarFieldPreviews(dir: string, result: RunFarFields, tiles?: TileOptions | null): Promise<WrittenFile[]>;
}

function npyWriter(dir: string, n: number, files: WrittenFile[]) {
  return async (name: string, data: NpyArray) => {
    files.push({ name, bytes: await writeChunks(join(dir, name), npyChunks(data, [n, n])) });
  };
}

function textWriter(dir: string, files: WrittenFile[]) {
  return async (name: string, content: string) => {
    await writeFile(join(dir, name), content);
    files.push({ name, bytes: Buffer.byteLength(content) });
  };
}

/**
 * Writes the layout files into `dir`: phase_a/b, delta_x/y, theta, atom_index (.npy), atoms.csv, layout.gds, the
 * map previews, and with `tiles` their tile pyramids (tiles.ts).
 */
export async function writeLayoutFiles(dir: string, data: LayoutFilesData, tiles?: TileOptions | null): Promise<WrittenFile[]> {
  const files: WrittenFile[] = [];
  const { n } = data;
  const npy = npyWriter(dir, n, files);
  await npy('phase_a.npy', data.phases.a);
  await npy('phase_b.npy', data.phases.b);
  await npy('delta_x.npy', data.deltaX);
  await npy('delta_y.npy', data.deltaY);
  await npy('theta.npy', data.theta);
  await npy('atom_index.npy', data.atomIndex);
  await textWriter(dir, files)('atoms.csv', atomLibraryToCsv(data.library));
  const gdsBytes = await writeChunks(
    join(dir, 'layout.gds'),
    gdsiiChunks({ n, period: data.period, atomIndex: data.atomIndex, theta: data.placement, library: data.library, layer: data.layer, datatype: data.datatype, usedAtomsOnly: true }),
  );
  files.push({ name: 'layout.gds', bytes: gdsBytes });
  const maps = { n, phases: data.phases, atomIndex: data.atomIndex, atomCount: data.library.atoms.length, theta: data.theta };
  files.push(...(await writePainted(dir, mapPreviewPainters(maps))));
  if (tiles) files.push(...(await writeTilePyramids(dir, mapTiledPictures(maps, tiles), n)));
  return files;
}

/** Paints the far-field previews into `dir`: the total and the output components under each input; with `tiles` the totals' pyramids. */
export async function writeFarFieldPreviews(dir: string, result: RunFarFields, tiles?: TileOptions | null): Promise<WrittenFile[]> {
  const files = await writePainted(dir, resultPreviewPainters(farFieldPreviewDataOf(result)));
  if (tiles) files.push(...(await writeTilePyramids(dir, farFieldTiledPictures(result, tiles), result.grid.n)));
  return files;
}

/** Files a helper thread is already writing: the layout files and the far-field previews. */
export interface EarlyFiles {
  layout?: Promise<WrittenFile[]>;
  farFieldPreviews?: Promise<WrittenFile[]>;
}

/**
 * Writes every output of a run into `dir` (which must exist) and returns the files: the layout files, the
 * far-field previews, then farfield_a/b.npy, design.json, metrics.json, drc.json and the beam and image-plane
 * previews; with `tiles` the pyramids of the far-field totals and maps. What `early` holds is awaited instead of
 * written here.
 */
export async function writeRunOutputs(run: DesignRun, dir: string, early: EarlyFiles = {}, tiles?: TileOptions | null): Promise<WrittenFile[]> {
  const layout = early.layout ?? writeLayoutFiles(dir, layoutFilesDataOf({ ...run, phases: { a: run.channels.a.phase, b: run.channels.b.phase } }), tiles);
  const farFieldPreviews = early.farFieldPreviews ?? writeFarFieldPreviews(dir, { ...run, windows: fourierWindows(run) }, tiles);
  // Settle both even if writing the files below fails, so no rejection goes unobserved.
  layout.catch(() => undefined);
  farFieldPreviews.catch(() => undefined);
  const files: WrittenFile[] = [];
  const npy = npyWriter(dir, run.grid.n, files);
  const text = textWriter(dir, files);
  await npy('farfield_a.npy', run.farFields.a.total);
  await npy('farfield_b.npy', run.farFields.b.total);
  await text('design.json', JSON.stringify(run.design, null, 2) + '\n');
  await text('metrics.json', JSON.stringify(metricsRecord(run), null, 2) + '\n');
  await text('drc.json', JSON.stringify(drcRecord(run), null, 2) + '\n');
  files.push(...(await writePainted(dir, resultPreviewPainters(beamPreviewDataOf(run)))));
  return [...(await layout), ...(await farFieldPreviews), ...files];
}

/** The far-field windows of a finished run's Fourier holograms. */
function fourierWindows(run: DesignRun): RunFarFields['windows'] {
  const windows: RunFarFields['windows'] = {};
  for (const c of CHANNEL_IDS) {
    const channel = run.channels[c];
    if (channel.window && channel.plan.hologram?.geometry === 'fourier') windows[c] = channel.window;
  }
  return windows;
}
