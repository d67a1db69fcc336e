/**
 * PNG previews of a run: far fields under inputs A, B and the extra input, each as the total and split into
 * its output polarization components — the parts along the output states λA* and λB* (where the device sends
 * inputs A and B, Mueller et al., Phys. Rev. Lett. 118, 113901 (2017)) and the x and y parts — all pictures of
 * one input on the total's intensity scale (gamma 0.5, full scale at the total's brightest pixel away from
 * the zero order), so a component that carries little light looks dark; target windows outlined. Then
 * channel phases in cyclic colours, the atom index, the rotation 2θ (cyclic), the x–z slice of each beam
 * channel and the image plane of each Fresnel hologram. The inputs are plain typed arrays, far fields
 * already pooled to preview size, so the pictures can be painted and encoded on a worker thread while the
 * main thread goes on: the maps of the layout (`MapPreviewData`: phases, atom index, rotation) are known as
 * soon as the atoms are mapped, the results (`ResultPreviewData`) when the engine is done.
 *
 * Far-field file names: farfield_<a|b|extra>.png (total), farfield_<input>_out-a.png and _out-b.png (along
 * λA*, λB*), farfield_<input>_x.png and _y.png — the last two only when the output states are not x and y
 * themselves (then they would repeat _out-a and _out-b).
 */
import { join } from 'node:path';
import { outlineRect, paintIndex, paintIntensity, paintPhase, poolMap, subsampleMap, type Rgb, type RgbaImage } from '../../shared/optics/colormap';
import { CHANNEL_IDS, INPUT_IDS, type ChannelId, type DesignRun, type FarFieldSet, type InputId, type RunFarFields } from '../../shared/optics/pipeline';
import type { JonesVector } from '../../shared/optics/types';
import type { PixelWindow, ScreenView } from '../../shared/optics/target';
import { writePng } from './png';

/** Largest preview side in pixels; larger designs are pooled (intensities) or subsampled (phases, indices). */
export const PREVIEW_MAX_SIDE = 1024;

/** Largest side of the far-field component pictures (the total keeps PREVIEW_MAX_SIDE): twelve of them per run. */
export const COMPONENT_MAX_SIDE = 512;

const WINDOW_COLORS: Record<ChannelId, Rgb> = { a: [90, 225, 255], b: [255, 96, 208] };

/** The output components of a far field, as file-name suffixes: along λA*, along λB*, x, y. */
export const FAR_FIELD_COMPONENTS = ['out-a', 'out-b', 'x', 'y'] as const;
export type FarFieldComponent = (typeof FAR_FIELD_COMPONENTS)[number];

/**
 * Far-field intensities of one input, mean-pooled to preview size: the total to side n / previewFactor(n),
 * the components to side n / previewFactor(n, COMPONENT_MAX_SIDE).
 */
export type FarFieldPreviewMaps = { total: Float32Array } & Partial<Record<FarFieldComponent, Float32Array>>;

/** The maps painted once the atoms are mapped: channel phases, atom index and rotation, N×N row-major. */
export interface MapPreviewData {
  n: number;
  phases: Record<ChannelId, Float64Array>;
  atomIndex: Int32Array;
  atomCount: number;
  theta: Float64Array;
}

/** The simulated results painted at the end of a run. */
export interface ResultPreviewData {
  n: number;
  farFields: Partial<Record<InputId, FarFieldPreviewMaps>>;
  /** Far-field windows of the Fourier holograms, per channel. */
  windows: Partial<Record<ChannelId, PixelWindow>>;
  slices: Partial<Record<ChannelId, { slice: Float32Array; planes: number }>>;
  fresnel: Partial<Record<ChannelId, { image: Float32Array; window: PixelWindow }>>;
  /** Pictures meant for a flat screen: the far field as seen there (target.ts `screenView`). */
  screens: Partial<Record<ChannelId, ScreenView>>;
}

export interface WrittenFile {
  name: string;
  bytes: number;
}

/** True when the analyser states are x and y themselves (each up to a phase), to 1e-9. */
function analyserIsXY([k0]: [JonesVector, JonesVector]): boolean {
  const xPower = k0[0][0] ** 2 + k0[0][1] ** 2;
  const yPower = k0[1][0] ** 2 + k0[1][1] ** 2;
  const total = xPower + yPower;
  return Math.min(xPower, yPower) <= 1e-9 * total;
}

/** One input's far-field maps at preview size (pooled copies when the design is larger than a preview). */
function farFieldMaps(set: FarFieldSet, n: number, withXY: boolean): FarFieldPreviewMaps {
  const pooled = (map: Float32Array, factor: number) => (factor > 1 ? poolMap(map, n, factor) : map);
  const factor = previewFactor(n, COMPONENT_MAX_SIDE);
  const small = (map: Float32Array) => pooled(map, factor);
  const maps: FarFieldPreviewMaps = { total: pooled(set.total, previewFactor(n)), 'out-a': small(set.analyserA), 'out-b': small(set.analyserB) };
  if (withXY) {
    maps.x = small(set.x);
    maps.y = small(set.y);
  }
  return maps;
}

/** The far-field previews' data, as soon as the far fields are simulated (pooled copies for large designs). */
export function farFieldPreviewDataOf(result: RunFarFields): ResultPreviewData {
  const n = result.grid.n;
  const withXY = !analyserIsXY(result.analyser);
  const data: ResultPreviewData = { n, farFields: {}, windows: { ...result.windows }, slices: {}, fresnel: {}, screens: {} };
  for (const input of INPUT_IDS) data.farFields[input] = farFieldMaps(result.farFields[input], n, withXY);
  return data;
}

/**
 * The other result previews' data: x–z slices of beam channels, image planes of Fresnel holograms, flat-screen
 * views of pictures meant for a screen (no copies).
 */
export function beamPreviewDataOf(run: DesignRun): ResultPreviewData {
  const data: ResultPreviewData = { n: run.grid.n, farFields: {}, windows: {}, slices: {}, fresnel: {}, screens: {} };
  for (const c of CHANNEL_IDS) {
    const channel = run.channels[c];
    if (channel.screenView) data.screens[c] = channel.screenView;
    if (channel.window && channel.fresnelImage) data.fresnel[c] = { image: channel.fresnelImage, window: channel.window };
    if (channel.beam) data.slices[c] = { slice: channel.beam.slice, planes: channel.beam.z.length };
  }
  return data;
}

/** Power-of-two pooling factor that brings side n down to at most `maxSide`. Example: previewFactor(2048) → 2. */
function previewFactor(n: number, maxSide = PREVIEW_MAX_SIDE): number {
  let factor = 1;
  while (n / factor > maxSide) factor *= 2;
  return factor;
}

type OutlinedWindow = { window: PixelWindow; color: Rgb };

/**
 * Full scale of a far-field preview (m×m map): its brightest pixel more than 2 px away from the zero order
 * at (m/2, m/2), so a bright zero order saturates instead of darkening the picture; the zero order's own
 * peak when nothing else is lit; undefined for an all-dark map.
 * Example: a map that is 1 everywhere and 100 at the centre → 1.
 */
export function farFieldFullScale(map: Float32Array, m: number): number | undefined {
  let max = 0;
  let peak = 0;
  const c = m / 2;
  const reach = 2;
  for (let y = 0; y < m; y++) {
    for (let x = 0; x < m; x++) {
      const v = map[y * m + x];
      if (v > peak) peak = v;
      if (Math.abs(x - c) <= reach && Math.abs(y - c) <= reach) continue;
      if (v > max) max = v;
    }
  }
  return max > 0 ? max : peak > 0 ? peak : undefined;
}

/**
 * Paints an m×m far-field map pooled by `factor` from the N×N grid: gamma 0.5 up to `max` (brighter pixels
 * saturate), windows (N×N pixel coordinates) outlined just outside.
 */
export function paintFarField(map: Float32Array, m: number, factor: number, windows: OutlinedWindow[], max: number | undefined): RgbaImage {
  const image = paintIntensity(map, m, m, { kind: 'gamma', gamma: 0.5, max });
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

/** Far-field preview of an N×N intensity map on its own scale (paintFarField after pooling). */
export function farFieldPreview(intensity: Float32Array, n: number, windows: OutlinedWindow[]): RgbaImage {
  const factor = previewFactor(n);
  const m = n / factor;
  const map = factor > 1 ? poolMap(intensity, n, factor) : intensity;
  return paintFarField(map, m, factor, windows, farFieldFullScale(map, m));
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

/**
 * A far field seen on a flat screen: irradiance, gamma 0.5 up to its brightest pixel, the picture's rectangle
 * outlined just outside.
 */
export function screenPreview(view: ScreenView, color: Rgb): RgbaImage {
  const image = paintIntensity(view.irradiance, view.width, view.height, { kind: 'gamma', gamma: 0.5 });
  const column = (x: number) => ((x - view.shown.x0) / (view.shown.x1 - view.shown.x0)) * view.width;
  const row = (y: number) => ((y - view.shown.y0) / (view.shown.y1 - view.shown.y0)) * view.height;
  const x0 = Math.floor(column(view.picture.x0)) - 1;
  const y0 = Math.floor(row(view.picture.y0)) - 1;
  outlineRect(image, { x0, y0, width: Math.ceil(column(view.picture.x1)) + 1 - x0, height: Math.ceil(row(view.picture.y1)) + 1 - y0 }, color);
  return image;
}

/** A preview file name and the function that paints it (nothing is painted until it is called). */
export type Painter = [name: string, paint: () => RgbaImage];

/** Side of the map previews and the factor `small` subsamples an N×N map by to get there. */
function mapPreviewSize(n: number) {
  const factor = previewFactor(n);
  const small = <T extends Float64Array | Int32Array>(values: T): T => (factor > 1 ? subsampleMap(values, n, factor) : values);
  return { m: n / factor, small };
}

/** The map previews: phase_a.png, phase_b.png, atom_index.png, rotation.png. */
export function mapPreviewPainters(data: MapPreviewData): Painter[] {
  const { m, small } = mapPreviewSize(data.n);
  return [
    ['phase_a.png', () => paintPhase(small(data.phases.a), m, m)],
    ['phase_b.png', () => paintPhase(small(data.phases.b), m, m)],
    ['atom_index.png', () => paintIndex(small(data.atomIndex), m, m, data.atomCount)],
    // θ is defined mod π: 2θ is painted in the cyclic colours so the picture has no seams.
    ['rotation.png', () => paintPhase(small(data.theta).map((t) => 2 * t), m, m)],
  ];
}

/** The result previews, in writing order: far fields of the inputs present, x–z slices, Fresnel image planes. */
export function resultPreviewPainters(data: ResultPreviewData): Painter[] {
  const { n } = data;
  const windowsOf = (ids: ChannelId[]) => ids.flatMap((c) => (data.windows[c] ? [{ window: data.windows[c]!, color: WINDOW_COLORS[c] }] : []));
  const farFieldInputs: [InputId, ChannelId[]][] = [
    ['a', ['a']],
    ['b', ['b']],
    ['extra', ['a', 'b']],
  ];
  const factor = previewFactor(n);
  const m = n / factor;
  const painters: Painter[] = [];
  const componentFactor = previewFactor(n, COMPONENT_MAX_SIDE);
  const componentSide = n / componentFactor;
  for (const [input, ids] of farFieldInputs) {
    const maps = data.farFields[input];
    if (!maps) continue;
    const windows = windowsOf(ids);
    painters.push([`farfield_${input}.png`, () => paintFarField(maps.total, m, factor, windows, farFieldFullScale(maps.total, m))]);
    // Every component on the scale of the total, pooled like the component pictures.
    let scale: number | undefined;
    const commonScale = () => (scale ??= farFieldFullScale(componentFactor > factor ? poolMap(maps.total, m, componentFactor / factor) : maps.total, componentSide));
    for (const component of FAR_FIELD_COMPONENTS) {
      const map = maps[component];
      if (map) painters.push([`farfield_${input}_${component}.png`, () => paintFarField(map, componentSide, componentFactor, windows, commonScale())]);
    }
  }
  for (const c of CHANNEL_IDS) {
    const slice = data.slices[c];
    if (slice) painters.push([`xz_${c}.png`, () => slicePreview(slice.slice, slice.planes, n)]);
    const fresnel = data.fresnel[c];
    if (fresnel) painters.push([`image_plane_${c}.png`, () => farFieldPreview(fresnel.image, n, [{ window: fresnel.window, color: WINDOW_COLORS[c] }])]);
    const screen = data.screens[c];
    if (screen) painters.push([`screen_${c}.png`, () => screenPreview(screen, WINDOW_COLORS[c])]);
  }
  return painters;
}

/** Paints the previews one by one and writes them into `dir`. */
export async function writePainted(dir: string, painters: Painter[]): Promise<WrittenFile[]> {
  const files: WrittenFile[] = [];
  for (const [name, paint] of painters) files.push({ name, bytes: await writePng(join(dir, name), paint()) });
  return files;
}
