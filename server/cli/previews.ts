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
 *
 * Every picture is painted in the picture convention (README "Picture convention"): x (or u = sin θx) to the
 * right and y (or v = sin θy) up, seen facing the device from the side the light goes to — so the N×N arrays,
 * row-major [iy, ix] with iy growing with y, are painted with their last row at the top (`upright`). The x–z
 * slices put z to the right and x up. `pictureFrames` says, per file, what its edges are in physical units.
 */
import { join } from 'node:path';
import { outlineRect, paintIndex, paintIntensity, paintPhase, poolMap, subsampleMap, upright, type Rgb, type RgbaImage } from '../../shared/optics/colormap';
import { CHANNEL_IDS, INPUT_IDS, type ChannelId, type DesignRun, type FarFieldSet, type InputId, type RunFarFields } from '../../shared/optics/pipeline';
import type { JonesVector } from '../../shared/optics/types';
import type { PixelWindow, ScreenView } from '../../shared/optics/target';
import { PICTURE_CONVENTION, type PictureAxis, type PictureFrame, type PictureFrames, type PictureKey } from '../../shared/schemas/pictures';
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
export function previewFactor(n: number, maxSide = PREVIEW_MAX_SIDE): number {
  let factor = 1;
  while (n / factor > maxSide) factor *= 2;
  return factor;
}

export type OutlinedWindow = { window: PixelWindow; color: Rgb };

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
 * saturate), windows (N×N pixel coordinates) outlined just outside, +v up (`upright`).
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
  return upright(image);
}

/** Far-field preview of an N×N intensity map on its own scale (paintFarField after pooling). */
export function farFieldPreview(intensity: Float32Array, n: number, windows: OutlinedWindow[]): RgbaImage {
  const factor = previewFactor(n);
  const m = n / factor;
  const map = factor > 1 ? poolMap(intensity, n, factor) : intensity;
  return paintFarField(map, m, factor, windows, farFieldFullScale(map, m));
}

/** x–z slice preview: z to the right (768 columns, nearest plane), x up (pooled to ≤ 1024 rows), gamma 0.5. */
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
  return upright(paintIntensity(values, width, rows, { kind: 'gamma', gamma: 0.5 }));
}

/**
 * A far field seen on a flat screen: irradiance, gamma 0.5 up to its brightest pixel, the picture's rectangle
 * outlined just outside.
 */
export function screenPreview(view: ScreenView, color: Rgb): RgbaImage {
  const image = paintIntensity(view.irradiance, view.width, view.height, { kind: 'gamma', gamma: 0.5 });
  const column = (x: number) => ((x - view.shown.x0) / (view.shown.x1 - view.shown.x0)) * view.width;
  // Row 0 is the top of the shown area (Y = shown.y1), as in `screenView`.
  const row = (y: number) => ((view.shown.y1 - y) / (view.shown.y1 - view.shown.y0)) * view.height;
  const x0 = Math.floor(column(view.picture.x0)) - 1;
  const y0 = Math.floor(row(view.picture.y1)) - 1;
  outlineRect(image, { x0, y0, width: Math.ceil(column(view.picture.x1)) + 1 - x0, height: Math.ceil(row(view.picture.y0)) + 1 - y0 }, color);
  return image;
}

/** A preview file name and the function that paints it (nothing is painted until it is called). */
export type Painter = [name: string, paint: () => RgbaImage];

/** The map previews: phase_a.png, phase_b.png, atom_index.png, rotation.png. */
export function mapPreviewPainters(data: MapPreviewData): Painter[] {
  return mapPainters(data, previewFactor(data.n));
}

/** The map pictures with every `factor`-th cell of the N×N maps (mapPreviewPainters: the preview's factor). */
export function mapPainters(data: MapPreviewData, factor: number): Painter[] {
  const { n } = data;
  const m = n / factor;
  const small = <T extends Float64Array | Int32Array>(values: T): T => (factor > 1 ? subsampleMap(values, n, factor) : values);
  return [
    ['phase_a.png', () => upright(paintPhase(small(data.phases.a), m, m))],
    ['phase_b.png', () => upright(paintPhase(small(data.phases.b), m, m))],
    ['atom_index.png', () => upright(paintIndex(small(data.atomIndex), m, m, data.atomCount))],
    // θ is defined mod π: 2θ is painted in the cyclic colours so the picture has no seams.
    ['rotation.png', () => upright(paintPhase(small(data.theta).map((t) => 2 * t), m, m))],
  ];
}

/** The target windows outlined on the far field under `input`: its own channel's, both under the extra input. */
export function outlinedWindows(windows: Partial<Record<ChannelId, PixelWindow>>, input: InputId): OutlinedWindow[] {
  const ids: ChannelId[] = input === 'extra' ? ['a', 'b'] : [input];
  return ids.flatMap((c) => (windows[c] ? [{ window: windows[c]!, color: WINDOW_COLORS[c] }] : []));
}

/** The result previews, in writing order: far fields of the inputs present, x–z slices, Fresnel image planes. */
export function resultPreviewPainters(data: ResultPreviewData): Painter[] {
  const { n } = data;
  const factor = previewFactor(n);
  const m = n / factor;
  const painters: Painter[] = [];
  const componentFactor = previewFactor(n, COMPONENT_MAX_SIDE);
  const componentSide = n / componentFactor;
  for (const input of INPUT_IDS) {
    const maps = data.farFields[input];
    if (!maps) continue;
    const windows = outlinedWindows(data.windows, input);
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

const MICRO = 1e6;
const FAR_FIELD_KEY: PictureKey = {
  colours: 'sequential',
  quantity: '√(I / I₀), I₀ = the brightest pixel more than 2 preview pixels from the zero order; brighter pixels (often the zero order) clipped at 1',
  from: '0',
  to: '1 (clipped above)',
};
const COMPONENT_KEY: PictureKey = { ...FAR_FIELD_KEY, quantity: `${FAR_FIELD_KEY.quantity}; I₀ taken from the total far field of the same input` };
const PHASE_KEY: PictureKey = { colours: 'cyclic', quantity: 'phase φ, rad (cyclic: −π and π share a colour)', from: '−π', to: 'π' };

/**
 * The frame of every preview a run writes, from the run's grid: far fields in direction cosines u = sin θx,
 * v = sin θy (edges of the centred grid, pixel i at (i − N/2)·λ/(N·P)); maps in µm (cell centres at
 * (i − (N−1)/2)·P, so the edges are ±N·P/2); x–z slices with z in mm (µm below 1 mm) to the right and x up;
 * Fresnel image planes in µm; flat-screen views in units of the screen distance L.
 * Example: N = 512, P = λ/2 → far-field u from −1.0039 to 0.9961.
 */
export function pictureFramesOf(run: DesignRun): PictureFrames {
  const { n, period, lambda } = run.grid;
  const deltaU = lambda / (n * period);
  const uAxis = (label: string): PictureAxis => ({ label, unit: '', from: (-n / 2 - 0.5) * deltaU, to: (n / 2 - 0.5) * deltaU });
  const half = (n * period * MICRO) / 2;
  const cellAxis = (label: string): PictureAxis => ({ label, unit: 'µm', from: -half, to: half });
  const frames: Record<string, PictureFrame> = {};
  const withXY = !analyserIsXY(run.analyser);
  for (const input of INPUT_IDS) {
    frames[`farfield_${input}.png`] = { x: uAxis('u = sin θx'), y: uAxis('v = sin θy'), key: FAR_FIELD_KEY };
    for (const component of FAR_FIELD_COMPONENTS) {
      if (component === 'x' || component === 'y' ? withXY : true) frames[`farfield_${input}_${component}.png`] = { x: uAxis('u = sin θx'), y: uAxis('v = sin θy'), key: COMPONENT_KEY };
    }
  }
  const map = (key: PictureKey): PictureFrame => ({ x: cellAxis('x'), y: cellAxis('y'), key });
  frames['phase_a.png'] = map(PHASE_KEY);
  frames['phase_b.png'] = map(PHASE_KEY);
  frames['delta_x.npy'] = map({ ...PHASE_KEY, quantity: 'propagation phase δx, rad (cyclic)' });
  frames['delta_y.npy'] = map({ ...PHASE_KEY, quantity: 'propagation phase δy, rad (cyclic)' });
  frames['atom_index.png'] = map({ colours: 'index', quantity: 'row of atoms.csv', from: '0', to: String(Math.max(0, run.library.atoms.length - 1)) });
  frames['rotation.png'] = map({ colours: 'cyclic', quantity: 'rotation θ, painted as 2θ (θ and θ + π are the same atom)', from: '0', to: 'π' });
  for (const c of CHANNEL_IDS) {
    const channel = run.channels[c];
    const z = channel.beam?.z;
    if (z && z.length > 0) {
      const columns = 768;
      const step = z.length > 1 ? (z[z.length - 1] - z[0]) / (columns - 1) : 0;
      const inMm = z[z.length - 1] >= 1e-3;
      const scale = inMm ? 1e3 : MICRO;
      frames[`xz_${c}.png`] = {
        x: { label: 'z', unit: inMm ? 'mm' : 'µm', from: (z[0] - step / 2) * scale, to: (z[z.length - 1] + step / 2) * scale },
        y: cellAxis('x'),
        key: { colours: 'sequential', quantity: '√(I / I_max) in the slice through the beam axis', from: '0', to: '1' },
      };
    }
    if (channel.fresnelImage) {
      const edge = (label: string): PictureAxis => ({ label, unit: 'µm', from: (-n / 2 - 0.5) * period * MICRO, to: (n / 2 - 0.5) * period * MICRO });
      frames[`image_plane_${c}.png`] = { x: edge('x'), y: edge('y'), key: { ...FAR_FIELD_KEY, quantity: '√(I / I₀) in the image plane, I₀ = the brightest pixel more than 2 preview pixels from the axis; brighter pixels clipped at 1' } };
    }
    const screen = channel.screenView;
    if (screen) {
      frames[`screen_${c}.png`] = {
        x: { label: 'X / L = tan θx', unit: '', from: screen.shown.x0, to: screen.shown.x1 },
        y: { label: 'Y / L = tan θy', unit: '', from: screen.shown.y0, to: screen.shown.y1 },
        key: { colours: 'sequential', quantity: '√(E / E_max), irradiance on the flat screen at distance L', from: '0', to: '1' },
      };
    }
  }
  return {
    convention: PICTURE_CONVENTION,
    meaning:
      'x (u = sin θx) to the right, y (v = sin θy) up, seen facing the device from the side the light goes to (light travelling towards the viewer); a target picture appears upright in this view',
    frames,
  };
}
