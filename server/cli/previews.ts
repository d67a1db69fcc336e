/**
 * PNG previews of a run: far fields under inputs A, B and the extra input (gamma 0.5, full scale at the
 * brightest pixel away from the zero order, target windows outlined), channel phases in cyclic colours, the
 * atom index, the rotation 2θ (cyclic), the x–z slice of each beam channel and the image plane of each
 * Fresnel hologram. The inputs are plain typed arrays (`PreviewData`), so the pictures can be painted and
 * encoded on a worker thread while the main thread writes the other files.
 */
import { join } from 'node:path';
import { outlineRect, paintIndex, paintIntensity, paintPhase, poolMap, subsampleMap, type Rgb, type RgbaImage } from '../../shared/optics/colormap';
import { CHANNEL_IDS, type ChannelId, type DesignRun, type InputId } from '../../shared/optics/pipeline';
import type { PixelWindow } from '../../shared/optics/target';
import { writePng } from './png';

/** Largest preview side in pixels; larger designs are pooled (intensities) or subsampled (phases, indices). */
export const PREVIEW_MAX_SIDE = 1024;

const WINDOW_COLORS: Record<ChannelId, Rgb> = { a: [90, 225, 255], b: [255, 96, 208] };

export interface PreviewData {
  n: number;
  farFields: Record<InputId, Float32Array>;
  /** Far-field windows of the Fourier holograms, per channel. */
  windows: Partial<Record<ChannelId, PixelWindow>>;
  phases: Record<ChannelId, Float64Array>;
  atomIndex: Int32Array;
  atomCount: number;
  theta: Float64Array;
  slices: Partial<Record<ChannelId, { slice: Float32Array; planes: number }>>;
  fresnel: Partial<Record<ChannelId, { image: Float32Array; window: PixelWindow }>>;
}

export interface WrittenFile {
  name: string;
  bytes: number;
}

/** The arrays of a run the previews need (no copies). */
export function previewDataOf(run: DesignRun): PreviewData {
  const data: PreviewData = {
    n: run.grid.n,
    farFields: { a: run.farFields.a.total, b: run.farFields.b.total, extra: run.farFields.extra.total },
    windows: {},
    phases: { a: run.channels.a.phase, b: run.channels.b.phase },
    atomIndex: run.mapping.atomIndex,
    atomCount: run.library.atoms.length,
    theta: run.decomposition.theta,
    slices: {},
    fresnel: {},
  };
  for (const c of CHANNEL_IDS) {
    const channel = run.channels[c];
    const geometry = channel.plan.hologram?.geometry;
    if (channel.window && geometry === 'fourier') data.windows[c] = channel.window;
    if (channel.window && channel.fresnelImage) data.fresnel[c] = { image: channel.fresnelImage, window: channel.window };
    if (channel.beam) data.slices[c] = { slice: channel.beam.slice, planes: channel.beam.z.length };
  }
  return data;
}

function previewFactor(n: number): number {
  let factor = 1;
  while (n / factor > PREVIEW_MAX_SIDE) factor *= 2;
  return factor;
}

/**
 * Far-field preview: gamma 0.5, full scale at the brightest pixel more than 2 px away from the zero order
 * (a bright zero order saturates instead of darkening the picture); windows outlined just outside.
 */
export function farFieldPreview(intensity: Float32Array, n: number, windows: { window: PixelWindow; color: Rgb }[]): RgbaImage {
  const factor = previewFactor(n);
  const m = n / factor;
  const map = factor > 1 ? poolMap(intensity, n, factor) : intensity;
  let max = 0;
  const c = m / 2;
  const reach = 2;
  for (let y = 0; y < m; y++) {
    for (let x = 0; x < m; x++) {
      if (Math.abs(x - c) <= reach && Math.abs(y - c) <= reach) continue;
      if (map[y * m + x] > max) max = map[y * m + x];
    }
  }
  const image = paintIntensity(map, m, m, { kind: 'gamma', gamma: 0.5, max: max > 0 ? max : undefined });
  for (const { window, color } of windows) {
    outlineRect(
      image,
      {
        x0: Math.floor(window.x0 / factor) - 1,
        y0: Math.floor(window.y0 / factor) - 1,
        width: Math.ceil(window.width / factor) + 2,
        height: Math.ceil(window.height / factor) + 2,
      },
      color,
    );
  }
  return image;
}

/** x–z slice preview: z to the right (768 columns, nearest plane), x downwards (pooled to ≤ 1024 rows), gamma 0.5. */
export function slicePreview(slice: Float32Array, planes: number, n: number): RgbaImage {
  const factor = previewFactor(n);
  const rows = n / factor;
  const width = 768;
  const values = new Float32Array(width * rows);
  for (let col = 0; col < width; col++) {
    const iz = Math.min(planes - 1, Math.round((col * (planes - 1)) / (width - 1)));
    for (let r = 0; r < rows; r++) {
      let sum = 0;
      for (let k = 0; k < factor; k++) sum += slice[iz * n + r * factor + k];
      values[r * width + col] = sum / factor;
    }
  }
  return paintIntensity(values, width, rows, { kind: 'gamma', gamma: 0.5 });
}

/** Every preview of the data as (file name, painter) pairs, in writing order; nothing is painted yet. */
export function previewPainters(data: PreviewData): [string, () => RgbaImage][] {
  const { n } = data;
  const windowsOf = (ids: ChannelId[]) => ids.flatMap((c) => (data.windows[c] ? [{ window: data.windows[c]!, color: WINDOW_COLORS[c] }] : []));
  const farFieldInputs: [InputId, ChannelId[]][] = [
    ['a', ['a']],
    ['b', ['b']],
    ['extra', ['a', 'b']],
  ];
  const factor = previewFactor(n);
  const m = n / factor;
  const small = <T extends Float64Array | Int32Array>(values: T): T => (factor > 1 ? subsampleMap(values, n, factor) : values);
  const painters: [string, () => RgbaImage][] = farFieldInputs.map(([input, ids]) => [`farfield_${input}.png`, () => farFieldPreview(data.farFields[input], n, windowsOf(ids))]);
  painters.push(['phase_a.png', () => paintPhase(small(data.phases.a), m, m)]);
  painters.push(['phase_b.png', () => paintPhase(small(data.phases.b), m, m)]);
  painters.push(['atom_index.png', () => paintIndex(small(data.atomIndex), m, m, data.atomCount)]);
  // θ is defined mod π: 2θ is painted in the cyclic colours so the picture has no seams.
  painters.push(['rotation.png', () => paintPhase(small(data.theta).map((t) => 2 * t), m, m)]);
  for (const c of CHANNEL_IDS) {
    const slice = data.slices[c];
    if (slice) painters.push([`xz_${c}.png`, () => slicePreview(slice.slice, slice.planes, n)]);
    const fresnel = data.fresnel[c];
    if (fresnel) painters.push([`image_plane_${c}.png`, () => farFieldPreview(fresnel.image, n, [{ window: fresnel.window, color: WINDOW_COLORS[c] }])]);
  }
  return painters;
}

/** Which previews to write: all, those a helper thread paints (far fields, channel phases), or the rest. */
export type PreviewSelection = 'all' | 'helper' | 'rest';

const HELPER_PREVIEWS = /^(farfield_|phase_)/;

function selected(name: string, selection: PreviewSelection): boolean {
  return selection === 'all' || (selection === 'helper') === HELPER_PREVIEWS.test(name);
}

/** The part of the data the helper's previews read: the arrays of the other previews are left out (not copied). */
export function helperPreviewData(data: PreviewData): PreviewData {
  return { ...data, atomIndex: new Int32Array(0), theta: new Float64Array(0), slices: {}, fresnel: {} };
}

/** Paints and writes the selected previews of `data` into `dir`. */
export async function writePreviews(dir: string, data: PreviewData, selection: PreviewSelection = 'all'): Promise<WrittenFile[]> {
  const files: WrittenFile[] = [];
  for (const [name, paint] of previewPainters(data)) {
    if (!selected(name, selection)) continue;
    files.push({ name, bytes: await writePng(join(dir, name), paint()) });
  }
  return files;
}
