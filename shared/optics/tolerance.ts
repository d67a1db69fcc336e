/**
 * Tolerance study of a realized device: how its figures of merit move when every pillar comes out wider and
 * longer by Δ (fabrication bias), or when it is lit at λ + δ instead of the design wavelength. Pure: no I/O.
 *
 * The device is the run's own layout (atom per cell and placement rotation θ from the mapping); only the
 * atoms' transmissions change. Each point re-simulates the device with device-preview.ts (one reusable
 * scratch, two FFTs per input, inputs A and B) and reports per channel:
 * - efficiency: into the target window for a far-field (Fourier) image hologram, exactly pipeline.ts's
 *   `efficiency`; otherwise (beams, lenses, tilts, Fresnel holograms) the wavefront efficiency
 *   |⟨a·e^{iφ} | output⟩|²/power², exactly pipeline.ts's `wavefrontEfficiency`;
 * - crosstalk, dB: for a Fourier hologram pipeline.ts's `crosstalk` (other output state / own output state in
 *   the window); otherwise the same ratio over the whole propagating far field;
 * - zero order: pipeline.ts's `zeroOrder` (power near the zero order / incident power, own input).
 * At Δ = 0 and δ = 0 the atoms are the library's own, so every figure equals the run's metric exactly.
 *
 * How a biased or detuned atom's transmission is found (`AtomResponseModel`):
 * - the APPROXIMATE demo library (`effectiveIndexResponse`): recomputed with the effective-index pillar model
 *   (effective-index.ts) at width + Δ, length + Δ, with Sellmeier dispersion of Si₃N₄ (Luke et al. 2015) and
 *   fused silica (Malitson 1965) at λ + δ (materials.ts) — the same model that made the library;
 * - any other library (`nearestAtomResponse`): the atom of the same kind (shape and height) nearest in
 *   (width + Δ, length + Δ), so the resolution is the library's own size step; such a library holds one
 *   wavelength, so detuning is not available.
 */
import type { AtomLibrary, MetaAtom } from './atoms';
import { mapAtoms } from './atoms';
import { createPreviewScratch, previewDevice, type FarFieldSet, type Field32 } from './device-preview';
import { cellGridOf, illuminationOf, polarizationPairOf } from './design-units';
import { pillarTransmission } from './effective-index';
import { initFft } from './fft';
import { illuminationAmplitude, incidentPower, type Illumination } from './illumination';
import type { JonesDecomposition } from './jones';
import { fusedSilicaIndex, siliconNitrideIndex } from './materials';
import { crosstalkDb, signalEfficiency, windowPower, zeroOrderFraction } from './metrics';
import { CHANNEL_IDS, conjugateJones, realizedChannelFidelity, zeroOrderRadius, type ChannelId, type ChannelPlan } from './pipeline';
import { normalizeJones } from './simulate';
import type { PixelWindow } from './target';
import type { CancelSignal, CellGrid, JonesVector, ProgressCallback } from './types';
import type { Design } from '../schemas/design';

/** Transmissions of every library atom (same order) after a size bias and at a wavelength. */
export interface AtomResponseModel {
  method: 'effective-index' | 'nearest-atom';
  /** One line for the user: how biased atoms are found. */
  description: string;
  /** False when the model knows one wavelength only. */
  detuningAvailable: boolean;
  detuningNote: string;
  /**
   * The atoms at bias `biasM` (metres, added to width and length) and vacuum wavelength `lambdaM`; only the
   * atoms flagged in `used` need be right. `mismatchM`: the largest distance between a biased size and the
   * size whose transmission was used (0 for a model that computes every size).
   */
  atomsAt(biasM: number, lambdaM: number, used: Uint8Array): { atoms: MetaAtom[]; mismatchM: number };
}

/** What a channel's figures refer to. */
export interface ToleranceChannel {
  id: ChannelId;
  label: string;
  /** 'window': far-field image hologram; 'wavefront': everything else. */
  kind: 'window' | 'wavefront';
  window: PixelWindow | null;
  /** Designed channel phase φ (radians, N×N): the reference of the wavefront efficiency. */
  phase: Float64Array;
}

/** The realized device and everything a point needs. */
export interface ToleranceSetup {
  grid: CellGrid;
  illumination: Illumination;
  amplitude: Float64Array | null;
  power: number;
  inputs: Record<ChannelId, JonesVector>;
  analyser: [JonesVector, JonesVector];
  atomIndex: Int32Array;
  /** Placement rotation per cell (θ, or θ + π/2 where the axes were swapped): the mapping's θ. */
  theta: Float64Array;
  library: AtomLibrary;
  channels: Record<ChannelId, ToleranceChannel>;
  zeroRadius: number;
}

/** Figures of one channel at one point (null where undefined, e.g. no light in the wanted state). */
export interface ToleranceFigures {
  efficiency: number | null;
  crosstalkDb: number | null;
  zeroOrder: number | null;
}

export interface TolerancePoint {
  /** Size bias added to every pillar's width and length, nm. */
  widthBiasNm: number;
  /** Wavelength detuning, nm. */
  detuneNm: number;
  channels: Record<ChannelId, ToleranceFigures> | null;
  /** Largest distance between a biased size and the library atom whose transmission stood in for it, nm. */
  mismatchNm: number | null;
  /** Why this point could not be computed (e.g. wavelength outside a Sellmeier fit's range). */
  error: string | null;
}

export interface ToleranceResults {
  /** Cells per side simulated (the run's N, or the central crop of a reduced study). */
  cells: number;
  /** The run's N when the study simulated a central crop only (figures then differ from the run's); else null. */
  reducedFrom: number | null;
  method: AtomResponseModel['method'];
  methodNote: string;
  detuningAvailable: boolean;
  detuningNote: string;
  designWavelengthNm: number;
  channels: Record<ChannelId, { label: string; kind: ToleranceChannel['kind']; efficiencyMeaning: string; crosstalkMeaning: string }>;
  zeroOrderMeaning: string;
  widthBias: TolerancePoint[];
  detuning: TolerancePoint[];
  /** Mean wall time per computed point, ms. */
  msPerPoint: number;
}

const NM = 1e-9;

/** Wraps a phase to [0, 2π), as the demo library stores its phases. Example: wrapPositive(-π/2) → 3π/2. */
function wrapPositive(a: number): number {
  return a - 2 * Math.PI * Math.floor(a / (2 * Math.PI));
}

/**
 * The effective-index model of the APPROXIMATE demo library (demo-library.ts): Si₃N₄ pillars of the library's
 * height on fused silica in air. A pillar whose biased width or length is ≤ 0 vanishes (bare cell); empty
 * cells stay bare (their transmission follows the substrate's index at λ). At Δ = 0 and λ = library.lambda
 * the library's own atoms are returned unchanged.
 * Example: effectiveIndexResponse(demoAtomLibrary()).atomsAt(0, 633e-9, used).atoms === library.atoms.
 */
export function effectiveIndexResponse(library: AtomLibrary): AtomResponseModel {
  return {
    method: 'effective-index',
    description:
      'APPROXIMATE demo library: every biased pillar recomputed with the effective-index model at width + Δ and length + Δ (Knox & Toulios 1970; Marcatili 1969), as the library itself was made',
    detuningAvailable: true,
    detuningNote: 'atoms recomputed at λ + δ with the same model and Sellmeier dispersion of Si₃N₄ (Luke et al. 2015) and fused silica (Malitson 1965)',
    atomsAt(biasM, lambdaM, used) {
      if (biasM === 0 && lambdaM === library.lambda) return { atoms: library.atoms, mismatchM: 0 };
      const nPillar = siliconNitrideIndex(lambdaM);
      const nSubstrate = fusedSilicaIndex(lambdaM);
      const tBare = Math.sqrt((4 * nSubstrate) / ((nSubstrate + 1) * (nSubstrate + 1)));
      const atoms = library.atoms.map((atom, j) => {
        if (!used[j]) return atom;
        const width = atom.width + biasM;
        const length = atom.length + biasM;
        if (atom.shape === 'empty' || width <= 0 || length <= 0) return { ...atom, tx: tBare, ty: tBare, alphaX: 0, alphaY: 0 };
        const t = pillarTransmission({ width, length, height: atom.height, lambda: lambdaM, nPillar, nSubstrate, nAmbient: 1 });
        return { ...atom, tx: t.tx, ty: t.ty, alphaX: wrapPositive(t.alphaX), alphaY: wrapPositive(t.alphaY) };
      });
      return { atoms, mismatchM: 0 };
    },
  };
}

/**
 * For a library of measured or simulated atoms: each used atom's transmission is replaced by that of the
 * atom of the same shape and height nearest (Euclidean) to (width + Δ, length + Δ); ties go to the lower
 * row. Empty cells are unchanged. Detuning is not available (the library holds one wavelength).
 * Example: with atoms of width 100 and 110 nm, a 100 nm pillar at Δ = +8 nm takes the 110 nm atom's t and α.
 */
export function nearestAtomResponse(library: AtomLibrary): AtomResponseModel {
  const atoms = library.atoms;
  return {
    method: 'nearest-atom',
    description: `library atoms: each biased pillar takes the transmission of the atom of the same kind nearest in (width + Δ, length + Δ); resolution is the library's own size step`,
    detuningAvailable: false,
    detuningNote: `detuning is not available: the library "${library.name}" holds transmissions at one wavelength (${(library.lambda / NM).toFixed(1)} nm) only`,
    atomsAt(biasM, lambdaM, used) {
      if (lambdaM !== library.lambda) throw new RangeError('this library holds one wavelength only; detuning is not available');
      if (biasM === 0) return { atoms, mismatchM: 0 };
      let mismatch = 0;
      const out = atoms.map((atom, j) => {
        if (!used[j] || atom.shape === 'empty') return atom;
        const w = atom.width + biasM;
        const l = atom.length + biasM;
        let best = -1;
        let bestD = Infinity;
        for (let m = 0; m < atoms.length; m++) {
          const other = atoms[m];
          if (other.shape !== atom.shape || Math.abs(other.height - atom.height) > 1e-12) continue;
          const d = Math.hypot(other.width - w, other.length - l);
          if (d < bestD) {
            bestD = d;
            best = m;
          }
        }
        mismatch = Math.max(mismatch, bestD);
        const near = atoms[best];
        return { ...atom, tx: near.tx, ty: near.ty, alphaX: near.alphaX, alphaY: near.alphaY };
      });
      return { atoms: out, mismatchM: mismatch };
    },
  };
}

/** The layout arrays a finished run stores (atom_index, delta_x, delta_y, theta, phase_a, phase_b). */
export interface StoredRunArrays {
  atomIndex: Int32Array;
  decomposition: JonesDecomposition;
  phases: Record<ChannelId, Float64Array>;
}

/**
 * Rebuilds the realized device of a run from its design, its channel plans (pipeline.ts `planChannel`, for the
 * target windows) and its stored arrays. The placement rotation (θ + π/2 where the atom's axes were swapped)
 * is not stored, so the mapping is repeated exactly as the run did it (`mapAtoms`, axis swap allowed); a
 * RangeError says so when it no longer gives the stored atom per cell (the library changed since the run).
 */
export function toleranceSetupOf(design: Design, plans: Record<ChannelId, ChannelPlan>, arrays: StoredRunArrays, library: AtomLibrary, signal?: CancelSignal): ToleranceSetup {
  const grid = cellGridOf(design);
  const count = grid.n * grid.n;
  for (const [name, length] of [
    ['atom_index', arrays.atomIndex.length],
    ['delta_x', arrays.decomposition.deltaX.length],
    ['delta_y', arrays.decomposition.deltaY.length],
    ['theta', arrays.decomposition.theta.length],
    ['phase_a', arrays.phases.a.length],
    ['phase_b', arrays.phases.b.length],
  ] as const) {
    if (length !== count) throw new RangeError(`${name} holds ${length} values, the design has ${grid.n}×${grid.n} cells`);
  }
  const mapped = mapAtoms(arrays.decomposition, library, { allowAxisSwap: true, complexError: false, signal });
  for (let i = 0; i < count; i++) {
    if (mapped.atomIndex[i] !== arrays.atomIndex[i]) {
      throw new RangeError(`the atom library no longer gives the run's layout (cell ${i}: atom ${mapped.atomIndex[i]} now, ${arrays.atomIndex[i]} in the run); run the revision again`);
    }
  }
  const illumination = illuminationOf(design);
  const amplitude = illumination.kind === 'flat' ? null : illuminationAmplitude(grid, illumination);
  const pair = polarizationPairOf(design);
  const inputs = { a: normalizeJones(pair.a), b: normalizeJones(pair.b) };
  const channels = {} as Record<ChannelId, ToleranceChannel>;
  for (const c of CHANNEL_IDS) {
    const hologram = plans[c].hologram;
    const fourier = hologram?.geometry === 'fourier';
    channels[c] = { id: c, label: plans[c].label, kind: fourier ? 'window' : 'wavefront', window: fourier ? hologram!.target.window : null, phase: arrays.phases[c] };
  }
  return {
    grid,
    illumination,
    amplitude,
    power: amplitude ? incidentPower(amplitude) : count,
    inputs,
    analyser: [conjugateJones(inputs.a), conjugateJones(inputs.b)],
    atomIndex: arrays.atomIndex,
    theta: mapped.theta,
    library,
    channels,
    zeroRadius: zeroOrderRadius(grid, illumination),
  };
}

function sum(map: Float32Array): number {
  let s = 0;
  for (let i = 0; i < map.length; i++) s += map[i];
  return s;
}

/** Figures of one channel from its far field (and near field, for wavefront channels). */
function channelFigures(setup: ToleranceSetup, channel: ToleranceChannel, farField: FarFieldSet, near: Field32 | null): ToleranceFigures {
  const { grid, power } = setup;
  const n = grid.n;
  const wanted = channel.id === 'a' ? farField.analyserA : farField.analyserB;
  const unwanted = channel.id === 'a' ? farField.analyserB : farField.analyserA;
  const finite = (v: number) => (Number.isFinite(v) ? v : null);
  const zeroOrder = zeroOrderFraction(farField.total, n, power, setup.zeroRadius);
  if (channel.kind === 'window' && channel.window) {
    const wantedPower = windowPower(wanted, n, channel.window);
    return {
      efficiency: signalEfficiency(farField.total, n, channel.window, power),
      crosstalkDb: wantedPower > 0 ? finite(crosstalkDb(wantedPower, windowPower(unwanted, n, channel.window))) : null,
      zeroOrder,
    };
  }
  const wantedPower = sum(wanted);
  return {
    efficiency: realizedChannelFidelity(near!, channel.phase, setup.amplitude, power).overlapEfficiency,
    crosstalkDb: wantedPower > 0 ? finite(crosstalkDb(wantedPower, sum(unwanted))) : null,
    zeroOrder,
  };
}

/** Reusable state of a study: one preview scratch and the used-atom mask. */
export interface ToleranceContext {
  setup: ToleranceSetup;
  used: Uint8Array;
  scratch: ReturnType<typeof createPreviewScratch>;
}

/** Prepares a study (needs `await initFft()` before `evaluatePoint`). */
export function toleranceContext(setup: ToleranceSetup): ToleranceContext {
  const used = new Uint8Array(setup.library.atoms.length);
  for (let i = 0; i < setup.atomIndex.length; i++) used[setup.atomIndex[i]] = 1;
  return { setup, used, scratch: createPreviewScratch(setup.grid.n) };
}

/**
 * One point of the study: the device with atoms from `model` at bias Δ (nm) and detuning δ (nm), simulated
 * under inputs A and B (module comment). A model's refusal (RangeError, e.g. a wavelength outside a Sellmeier
 * fit) becomes the point's `error`.
 * Example: evaluatePoint(context, model, 0, 0).channels.a.efficiency equals the run's channel A efficiency.
 */
export function evaluatePoint(context: ToleranceContext, model: AtomResponseModel, widthBiasNm: number, detuneNm: number): TolerancePoint {
  const { setup } = context;
  const lambda = setup.grid.lambda + detuneNm * NM;
  let response: { atoms: MetaAtom[]; mismatchM: number };
  try {
    response = model.atomsAt(widthBiasNm * NM, detuneNm === 0 ? setup.grid.lambda : lambda, context.used);
  } catch (error) {
    if (error instanceof RangeError) return { widthBiasNm, detuneNm, channels: null, mismatchNm: null, error: error.message };
    throw error;
  }
  const grid: CellGrid = detuneNm === 0 ? setup.grid : { ...setup.grid, lambda };
  const placed = { atomIndex: setup.atomIndex, theta: setup.theta, library: { ...setup.library, atoms: response.atoms } };
  const channels = {} as Record<ChannelId, ToleranceFigures>;
  for (const c of CHANNEL_IDS) {
    const channel = setup.channels[c];
    const own = c === 'a' ? 0 : 1;
    const keep: [boolean, boolean] = [channel.kind === 'wavefront' && own === 0, channel.kind === 'wavefront' && own === 1];
    const { farField, nearFields } = previewDevice(placed, { grid, amplitude: setup.amplitude, input: setup.inputs[c], analyser: setup.analyser, scratch: context.scratch, keepNearFields: keep });
    channels[c] = channelFigures(setup, channel, farField, nearFields[own]);
  }
  return { widthBiasNm, detuneNm, channels, mismatchNm: response.mismatchM / NM, error: null };
}

export interface ToleranceRequest {
  widthBiasNm: number[];
  detuneNm: number[];
  /** Simulate only the central cells × cells of the device (a power of two below N) to save time. */
  cells?: number;
}

/**
 * The central m×m cells of a device, for a quicker, approximate study. Target windows keep their direction
 * cosines: far-field pixel p of the N grid (zero order at N/2, step λ/(N·P)) becomes m/2 + (p − N/2)·m/N.
 * The zero-order radius is recomputed for the crop (pipeline.ts rule); the incident power is the crop's.
 * Example: reduceSetup(setup1024, 256).grid.n → 256; a window at pixels 600…700 moves to 152…177.
 */
export function reduceSetup(setup: ToleranceSetup, m: number): ToleranceSetup {
  const n = setup.grid.n;
  if (!Number.isInteger(Math.log2(m)) || m < 64 || m >= n) throw new RangeError(`a reduced study needs a power of two from 64 to below ${n} cells, got ${m}`);
  const offset = (n - m) / 2;
  const crop = <T extends Float64Array | Int32Array>(source: T, make: (k: number) => T): T => {
    const out = make(m * m);
    for (let y = 0; y < m; y++) out.set(source.subarray((y + offset) * n + offset, (y + offset) * n + offset + m) as never, y * m);
    return out;
  };
  const amplitude = setup.amplitude ? crop(setup.amplitude, (k) => new Float64Array(k)) : null;
  const scale = m / n;
  const windowOf = (w: PixelWindow | null): PixelWindow | null => {
    if (!w) return null;
    const x0 = Math.max(0, Math.floor(m / 2 + (w.x0 - n / 2) * scale));
    const y0 = Math.max(0, Math.floor(m / 2 + (w.y0 - n / 2) * scale));
    return { x0, y0, width: Math.max(1, Math.min(m - x0, Math.round(w.width * scale))), height: Math.max(1, Math.min(m - y0, Math.round(w.height * scale))) };
  };
  const channels = {} as Record<ChannelId, ToleranceChannel>;
  for (const c of CHANNEL_IDS) {
    const ch = setup.channels[c];
    channels[c] = { ...ch, window: windowOf(ch.window), phase: crop(ch.phase, (k) => new Float64Array(k)) };
  }
  const grid = { ...setup.grid, n: m };
  return {
    ...setup,
    grid,
    amplitude,
    power: amplitude ? incidentPower(amplitude) : m * m,
    atomIndex: crop(setup.atomIndex, (k) => new Int32Array(k)),
    theta: crop(setup.theta, (k) => new Float64Array(k)),
    channels,
    zeroRadius: zeroOrderRadius(grid, setup.illumination),
  };
}

/**
 * The whole study: the width-bias sweep at the design wavelength, then the detuning sweep at zero bias
 * (skipped, with the model's note, when the model has one wavelength only). Progress 0…1 after every point;
 * cancellation checked between points.
 */
export async function runToleranceStudy(
  setup: ToleranceSetup,
  model: AtomResponseModel,
  request: ToleranceRequest,
  options: { onProgress?: ProgressCallback; signal?: CancelSignal } = {},
): Promise<ToleranceResults> {
  await initFft();
  const full = setup.grid.n;
  if (request.cells !== undefined && request.cells < full) setup = reduceSetup(setup, request.cells);
  const context = toleranceContext(setup);
  const detunings = model.detuningAvailable ? request.detuneNm : [];
  const total = request.widthBiasNm.length + detunings.length;
  let done = 0;
  let computeMs = 0;
  const step = (bias: number, detune: number, stage: string) => {
    options.signal?.throwIfAborted();
    const started = Date.now();
    const point = evaluatePoint(context, model, bias, detune);
    computeMs += Date.now() - started;
    done++;
    options.onProgress?.(done / Math.max(1, total), stage);
    return point;
  };
  const widthBias = request.widthBiasNm.map((bias) => step(bias, 0, 'width bias'));
  const detuning = detunings.map((detune) => step(0, detune, 'detuning'));
  const channelInfo = {} as ToleranceResults['channels'];
  for (const c of CHANNEL_IDS) {
    const channel = setup.channels[c];
    channelInfo[c] = {
      label: channel.label,
      kind: channel.kind,
      efficiencyMeaning:
        channel.kind === 'window'
          ? "power in the target window / incident power, under this channel's input (fraction)"
          : "|⟨designed a·e^{iφ} | realized output⟩|² / incident power²: share of the incident power in the designed wavefront (fraction)",
      crosstalkMeaning:
        channel.kind === 'window'
          ? "10·log10(power in the other channel's output state / power in this channel's output state), in this channel's window (dB)"
          : "10·log10(power in the other channel's output state / power in this channel's output state), whole far field (dB)",
    };
  }
  return {
    cells: setup.grid.n,
    reducedFrom: setup.grid.n < full ? full : null,
    method: model.method,
    methodNote: model.description,
    detuningAvailable: model.detuningAvailable,
    detuningNote: model.detuningNote,
    designWavelengthNm: setup.grid.lambda / NM,
    channels: channelInfo,
    zeroOrderMeaning: `far-field power within ${setup.zeroRadius.toFixed(1)} px of the zero order / incident power, under the channel's input (fraction)`,
    widthBias,
    detuning,
    msPerPoint: total ? computeMs / total : 0,
  };
}

/**
 * The response model for a design's library: the effective-index model for the demo library
 * (`atomLibrary.source === 'demo'`), the nearest library atom otherwise.
 */
export function responseModelFor(design: Design, library: AtomLibrary): AtomResponseModel {
  return design.atomLibrary.source === 'demo' ? effectiveIndexResponse(library) : nearestAtomResponse(library);
}
