/**
 * A design run, from a validated design file to a realized, simulated device: the orchestration of the
 * optics engine. Pure: no Node API, no I/O — images, phase maps and the atom library are resolved by the
 * caller, and the per-channel phase retrieval can be injected (e.g. two worker threads).
 *
 * Steps (progress stages in brackets; cancellation checked between and inside them):
 * 1. [prepare] engine units (design-units.ts); per channel the analytic terms' phase sum and, for an image
 *    hologram, its target plane (target.ts).
 * 2. [phase retrieval] GS / weighted GS / MRAF per hologram channel (gerchberg-saxton.ts), error history kept;
 *    channel phase φ = analytic sum + retrieved phase, wrapped to (−π, π].
 * 3. [jones synthesis] J = [e^{iφA} λA*, e^{iφB} λB*]·[λA, λB]⁻¹ and its decomposition into δx, δy, θ
 *    (Mueller et al., Phys. Rev. Lett. 118, 113901 (2017); jones.ts).
 * 4. [atom mapping] best atom per cell (atoms.ts), 90° axis swap allowed; mapping statistics.
 * 5. [simulation] the realized device — per cell R(θ)·diag(tx e^{iαx}, ty e^{iαy})·R(θ)ᵀ from the chosen
 *    atoms' own t and α, as atoms.ts `realizeDevice` builds it — under input A, input B and the extra input:
 *    near field J·(a·input), far field of its projections on the analyser basis [λA*, λB*] (the states J
 *    sends A and B to) and of its x and y components (device-preview.ts; propagation.ts conventions:
 *    centred, unitary, evanescent pixels zero). The Jones field itself is never stored (268 MB at 2048²).
 * 6. [beam propagation] x–z slices and profiles of axicon channels, focal spots of lens channels, image
 *    planes of Fresnel holograms (angular spectrum, beam-analysis.ts).
 * 7. [design rules] minimum gap, feature and aspect ratio of the layout (drc.ts).
 *
 * Memory: big maps that leave this module are float32 except the phases and cell parameters (float64, they
 * are the fabrication data); the realized Jones field and near fields live only while they are used.
 */
import { PHASE_TERM_LABELS, type AssetRef, type Design } from '../schemas/design';
import type { ArrayMemory } from './arrays';
import { buildAtomLookup, mapAtoms, type AtomLibrary } from './atoms';
import { analyzeBeam, analyzeFocus, beamPlanes, type BeamAnalysis, type BeamSpec, type FocusAnalysis } from './beam-analysis';
import {
  analyticTermOf,
  beamPlanesOf,
  cellGridOf,
  designRulesOf,
  DesignUnitsError,
  farFieldWindowOf,
  screenWindowOf,
  illuminationOf,
  jonesVectorOf,
  polarizationPairOf,
} from './design-units';
import { checkDesignRules, type DrcReport } from './drc';
import { initFft } from './fft';
import { retrievePhase, type RetrievalOptions, type RetrievalResult } from './gerchberg-saxton';
import { illuminationAmplitude, incidentPower, type Illumination } from './illumination';
import { synthesizeDecomposition, type JonesDecomposition } from './jones';
import {
  correlation,
  crosstalkDb,
  normalizedRmse,
  signalEfficiency,
  uniformity,
  windowPower,
  zeroOrderFraction,
} from './metrics';
import { axiconSinBeta, sumPhaseMaps, sumPhaseTerms, wrapPhase, type PhaseTerm } from './phase-terms';
import type { PolarizationPair } from './polarization';
import { AngularSpectrumPropagator, directionCosineStep } from './propagation';
import { blazedEfficiency, equivalentPhaseLevels, metric, type MetricGroup } from './run-metrics';
import { createPreviewScratch, previewDevice, type FarFieldSet, type Field32 } from './device-preview';
import { atomUsage, mappingReport, RETARDANCE_THRESHOLD, type MappingReport } from './mapping-report';
import { normalizeJones } from './simulate';
import {
  buildScreenTarget,
  buildTargetPlane,
  screenRect,
  screenView,
  type GrayImage,
  type PixelWindow,
  type ScreenRect,
  type ScreenView,
  type TargetGeometry,
  type TargetPlane,
} from './target';
import type { CancelSignal, CellGrid, ComplexField, JonesVector, ProgressCallback } from './types';
import { formatLength } from '../display-names';

export type { FarFieldSet } from './device-preview';

export type ChannelId = 'a' | 'b';
export type InputId = 'a' | 'b' | 'extra';
export const CHANNEL_IDS: readonly ChannelId[] = ['a', 'b'];
export const INPUT_IDS: readonly InputId[] = ['a', 'b', 'extra'];

/** One channel's phase retrieval, without callbacks, so it can be sent to another thread. */
export type RetrievalJobOptions = Omit<RetrievalOptions, 'onProgress' | 'signal'>;

export interface RetrievalJob {
  channel: ChannelId;
  options: RetrievalJobOptions;
}

export interface RetrievalHooks {
  /** Progress of job `job` (index into the job list). */
  onProgress?: (job: number, fraction: number, detail?: Record<string, number>) => void;
  signal?: CancelSignal;
}

/** Runs the retrieval jobs (in any order or in parallel) and returns their results in job order. */
export type ChannelRetriever = (jobs: RetrievalJob[], hooks: RetrievalHooks) => Promise<RetrievalResult[]>;

/** What the caller resolves for a run. */
export interface DesignResources {
  /** Picture of an image-hologram term. */
  images: (ref: AssetRef) => GrayImage;
  /** Custom phase map, radians, N×N row-major. */
  phaseMaps: (ref: AssetRef) => Float64Array;
  library: AtomLibrary;
  /** Phase retrieval of the hologram channels; default `retrieveSequentially` on this thread. */
  retrieveChannels?: ChannelRetriever;
}

export interface RunOptions {
  /**
   * Overall fraction 0…1 and stage name: 'prepare', 'phase retrieval', 'jones synthesis', 'atom mapping',
   * 'simulation', 'beam propagation', 'design rules' (those that apply, in this order). During phase
   * retrieval `detail` holds the reporting channel (0 = A, 1 = B), its own fraction `channelFraction`, and
   * retrievePhase's iteration, fourierError, windowError and windowEfficiency.
   */
  onProgress?: ProgressCallback;
  /**
   * Called once, as soon as the atoms are mapped (before the simulation): the layout's arrays are final
   * from then on, so a caller can start writing them while the engine goes on. Must not modify them.
   */
  onLayout?: (layout: RunLayout) => void;
  /** Called once the far fields under the three inputs are simulated (before beams, design rules, metrics). */
  onFarFields?: (result: RunFarFields) => void;
  /**
   * Where the large result arrays are allocated (arrays.ts): 'shared' lets the callbacks above hand them to
   * other threads without copies. Default 'private'.
   */
  memory?: ArrayMemory;
  signal?: CancelSignal;
}

/** The simulated far fields of a run, with the analyser basis and the Fourier holograms' target windows. */
export type RunFarFields = Pick<DesignRun, 'grid' | 'farFields' | 'analyser'> & { windows: Partial<Record<ChannelId, PixelWindow>> };

/** The part of a run fixed once the atoms are mapped (same arrays as in the finished DesignRun). */
export type RunLayout = Pick<DesignRun, 'design' | 'grid' | 'decomposition' | 'mapping' | 'library'> & { phases: Record<ChannelId, Float64Array> };

/**
 * The default retriever: the jobs one after the other on this thread (needs `await initFft()`, which
 * `runDesign` does). Example: retrieveSequentially([job], {}) → [retrievePhase(job.options)].
 */
export async function retrieveSequentially(jobs: RetrievalJob[], hooks: RetrievalHooks): Promise<RetrievalResult[]> {
  const results: RetrievalResult[] = [];
  for (let j = 0; j < jobs.length; j++) {
    results.push(
      retrievePhase({
        ...jobs[j].options,
        signal: hooks.signal,
        onProgress: (fraction, _stage, detail) => hooks.onProgress?.(j, fraction, detail),
      }),
    );
  }
  return results;
}

/** The image hologram of a channel. */
export interface HologramPlan {
  termIndex: number;
  target: TargetPlane;
  geometry: TargetGeometry;
  /** Image distance for the Fresnel geometry, metres. */
  fresnelDistance?: number;
  /** Pictures seen on a flat screen: the picture's rectangle there (units of the screen distance). */
  screen?: ScreenRect;
  options: RetrievalJobOptions;
}

/** What a channel's recipe asks for, in engine units. */
export interface ChannelPlan {
  id: ChannelId;
  label: string;
  /** Wrapped sum of the analytic terms (radians, N×N); null when the channel has none. */
  analyticPhase: Float64Array | null;
  hologram: HologramPlan | null;
  /** Axicon channels: the beam to analyse. */
  beam: BeamSpec | null;
  /** Single converging lens: its focal length, metres. */
  focalLength: number | null;
  /** Sum of the vortex charges ℓ. */
  charge: number;
}

/**
 * Turns a channel's recipe into engine terms, its hologram target and its beam facts. Throws
 * DesignUnitsError naming the design field when a value cannot be used (window outside the propagating
 * region, two holograms in one channel, custom map of the wrong size …). `memory`: where the hologram target's
 * amplitude plane is allocated (arrays.ts), so a retrieval thread gets it without a copy.
 */
export function planChannel(design: Design, id: ChannelId, resources: Pick<DesignResources, 'images' | 'phaseMaps'>, memory?: ArrayMemory): ChannelPlan {
  const grid = cellGridOf(design);
  const illumination = illuminationOf(design);
  const recipe = design.channels[id];
  const base = `channels.${id}.terms`;
  const analytic: PhaseTerm[] = [];
  let hologram: HologramPlan | null = null;
  let sinBeta = 0;
  let charge = 0;
  let tiltU = 0;
  let tiltV = 0;
  const lenses: number[] = [];
  recipe.terms.forEach((term, index) => {
    const path = `${base}.${index}`;
    if (term.kind === 'hologram') {
      if (hologram) throw new DesignUnitsError(path, `a channel holds at most one image hologram (term ${hologram.termIndex} is one already)`);
      const geometry: TargetGeometry = term.fresnelDistanceUm !== undefined ? 'fresnel' : 'fourier';
      let target: TargetPlane;
      let screen: ScreenRect | undefined;
      try {
        const image = resources.images(term.image);
        if (term.seenOn === 'flat-screen') {
          const spec = screenWindowOf(term.window, geometry, path);
          screen = screenRect(spec, image.width / image.height);
          target = buildScreenTarget(grid, image, spec, { gamma: term.gamma, memory });
        } else {
          target = buildTargetPlane(grid, image, farFieldWindowOf(term.window, geometry, `${path}.window`), { geometry, gamma: term.gamma, memory });
        }
      } catch (error) {
        if (error instanceof RangeError && !(error instanceof DesignUnitsError)) throw new DesignUnitsError(`${path}.window`, error.message);
        throw error;
      }
      const options: RetrievalJobOptions = {
        grid,
        target,
        algorithm: term.algorithm,
        iterations: term.iterations,
        seed: term.seed,
        mixing: term.mixing,
        illumination,
      };
      const plan: HologramPlan = { termIndex: index, target, geometry, options };
      if (screen) plan.screen = screen;
      if (term.fresnelDistanceUm !== undefined) {
        plan.fresnelDistance = term.fresnelDistanceUm * 1e-6;
        options.fresnelDistance = plan.fresnelDistance;
        options.padding = design.simulation.padding;
      }
      hologram = plan;
      return;
    }
    let phaseMap: Float64Array | undefined;
    if (term.kind === 'custom') {
      phaseMap = resources.phaseMaps(term.phaseMap);
      if (phaseMap.length !== grid.n * grid.n) {
        throw new DesignUnitsError(`${path}.phaseMap`, `the phase map holds ${phaseMap.length} values, the design needs ${grid.n}×${grid.n} = ${grid.n * grid.n}`);
      }
    }
    const engineTerm = analyticTermOf(term, phaseMap);
    if (!engineTerm) return;
    if (engineTerm.kind === 'axicon') sinBeta += axiconSinBeta(engineTerm);
    else if (engineTerm.kind === 'vortex') charge += engineTerm.charge;
    else if (engineTerm.kind === 'tilt') {
      tiltU += Math.sin(engineTerm.thetaX);
      tiltV += Math.sin(engineTerm.thetaY);
    } else if (engineTerm.kind === 'lens') lenses.push(engineTerm.focalLength);
    analytic.push(engineTerm);
  });
  if (!(sinBeta < 1)) throw new DesignUnitsError(base, `the axicons add up to sinβ = ${sinBeta.toFixed(3)}, which does not propagate (must stay below 1)`);
  if (tiltU * tiltU + tiltV * tiltV >= 1) throw new DesignUnitsError(base, 'the tilts add up to a direction that does not propagate');
  const apertureRadius = Math.min((grid.n * grid.period) / 2, illumination.kind === 'gaussian' ? illumination.waist : Infinity);
  const beam: BeamSpec | null = sinBeta > 0 ? { sinBeta, charge, tiltU, tiltV, apertureRadius } : null;
  const focalLength = !beam && lenses.length === 1 && lenses[0] > 0 ? lenses[0] : null;
  return {
    id,
    label: recipe.label || `channel ${id.toUpperCase()} (${recipe.terms.map((t) => PHASE_TERM_LABELS[t.kind]).join(' + ')})`,
    analyticPhase: analytic.length ? sumPhaseTerms(grid, analytic) : null,
    hologram,
    beam,
    focalLength,
    charge,
  };
}

export interface ChannelOutcome {
  plan: ChannelPlan;
  /** Channel phase φ (radians, (−π, π], N×N). */
  phase: Float64Array;
  retrieval: { fourierError: Float64Array; windowError: Float64Array; windowEfficiency: Float64Array } | null;
  /** Target intensity (amplitude²) of the hologram, float32, image-plane layout of target.ts. */
  targetIntensity: Float32Array | null;
  window: PixelWindow | null;
  beam: BeamAnalysis | null;
  focus: FocusAnalysis | null;
  /** Image-plane intensity of a Fresnel hologram under its own input (both output components), float32. */
  fresnelImage: Float32Array | null;
  /** A picture meant for a flat screen: the channel's far field under its own input as irradiance there. */
  screenView: ScreenView | null;
}

export interface RunMetrics {
  run: MetricGroup;
  channels: Record<ChannelId, MetricGroup>;
  extraInput: MetricGroup;
  mapping: MetricGroup;
  designRules: MetricGroup;
}

export interface DesignRun {
  design: Design;
  grid: CellGrid;
  pair: PolarizationPair;
  /** Input Jones vectors (unit norm) of the three previews. */
  inputs: Record<InputId, JonesVector>;
  /** Analyser basis [λA*, λB*]. */
  analyser: [JonesVector, JonesVector];
  channels: Record<ChannelId, ChannelOutcome>;
  /** Ideal cell parameters δx, δy, θ (radians). */
  decomposition: JonesDecomposition;
  /** Chosen atom per cell and its placement rotation (θ, or θ + π/2 where the axes were swapped). */
  mapping: { atomIndex: Int32Array; theta: Float64Array; cost: Float32Array };
  farFields: Record<InputId, FarFieldSet>;
  drc: DrcReport;
  library: AtomLibrary;
  metrics: RunMetrics;
  /** Error histogram and atom usage of the mapping (mapping-report.ts). */
  mappingReport: MappingReport;
  /** Wall time per stage, milliseconds. */
  timings: Record<string, number>;
}

/** Relative weights of the progress stages (measured shares of a 1024² twin-image run). */
const STAGE_WEIGHTS: Record<string, number> = {
  prepare: 1,
  'phase retrieval': 60,
  'jones synthesis': 2,
  'atom mapping': 4,
  simulation: 8,
  'beam propagation': 12,
  'design rules': 3,
};

function stagedProgress(callback: ProgressCallback | undefined, stages: string[]) {
  const total = stages.reduce((s, name) => s + STAGE_WEIGHTS[name], 0);
  const start = new Map<string, number>();
  let at = 0;
  for (const name of stages) {
    start.set(name, at);
    at += STAGE_WEIGHTS[name];
  }
  return (stage: string, fraction: number, detail?: Record<string, number>) => {
    const s = start.get(stage);
    if (s === undefined || !callback) return;
    callback((s + STAGE_WEIGHTS[stage] * Math.min(1, Math.max(0, fraction))) / total, stage, detail);
  };
}

/** Complex conjugate of a Jones vector. Example: conj([1, i]/√2) = [1, −i]/√2. */
export function conjugateJones(v: JonesVector): JonesVector {
  return [
    [v[0][0], -v[0][1]],
    [v[1][0], -v[1][1]],
  ];
}

function toField64(field: Field32): ComplexField {
  return { n: field.n, re: Float64Array.from(field.re), im: Float64Array.from(field.im) };
}

/**
 * Radius (far-field pixels) that holds the zero order: 1 for flat illumination (the peak and its four
 * neighbours); for a Gaussian beam 1.5 × its far-field 1/e² radius N·P/(π w).
 */
export function zeroOrderRadius(grid: CellGrid, illumination: Illumination): number {
  if (illumination.kind !== 'gaussian') return 1;
  return Math.max(1, (1.5 * grid.n * grid.period) / (Math.PI * illumination.waist));
}

/** Per-cell overlap of a channel's output field P with the ideal a·e^{iφ}: efficiency, offset-free phase RMS error. */
export function realizedChannelFidelity(output: Field32, phase: Float64Array, amplitude: Float64Array | null, power: number) {
  let sRe = 0;
  let sIm = 0;
  let wanted = 0;
  for (let i = 0; i < phase.length; i++) {
    const a = amplitude ? amplitude[i] : 1;
    const c = Math.cos(phase[i]);
    const s = Math.sin(phase[i]);
    const pr = output.re[i];
    const pi = output.im[i];
    sRe += a * (c * pr + s * pi);
    sIm += a * (c * pi - s * pr);
    wanted += pr * pr + pi * pi;
  }
  const offset = Math.atan2(sIm, sRe);
  let sumSq = 0;
  for (let i = 0; i < phase.length; i++) {
    const a = amplitude ? amplitude[i] : 1;
    if (a === 0) continue;
    const pr = output.re[i];
    const pi = output.im[i];
    if (pr === 0 && pi === 0) continue;
    sumSq += a * a * wrapPhase(Math.atan2(pi, pr) - phase[i] - offset) ** 2;
  }
  return {
    overlapEfficiency: (sRe * sRe + sIm * sIm) / (power * power),
    phaseRmsError: Math.sqrt(sumSq / power),
    wantedStateFraction: wanted / power,
    commonPhase: offset,
  };
}

function hologramMetrics(
  intensity: ArrayLike<number>,
  wanted: ArrayLike<number>,
  unwanted: ArrayLike<number>,
  target: Float32Array,
  n: number,
  window: PixelWindow,
  power: number,
  plane: string,
): MetricGroup {
  return {
    efficiency: metric(signalEfficiency(intensity, n, window, power), 'fraction', `power in the target window of the ${plane} / incident power, under this channel's input`),
    uniformity: metric(
      uniformity(intensity, target, n, window),
      '',
      '1 − (max − min)/(max + min) of intensity/target over window pixels brighter than half the target peak (1 = uniform; common practice, no published source)',
    ),
    correlation: metric(correlation(intensity, target, n, window), '', 'Pearson correlation of intensity and target intensity over the window'),
    rmse: metric(
      normalizedRmse(intensity, target, n, window),
      'fraction of target peak',
      'RMS difference of least-squares-scaled intensity and target intensity over the window, in units of the target peak',
    ),
    crosstalk: metric(
      crosstalkDb(windowPower(wanted, n, window), windowPower(unwanted, n, window)),
      'dB',
      "10·log10(power in the other channel's output state / power in this channel's output state), both in this channel's window under this channel's input",
    ),
  };
}

/**
 * Runs a design end to end (module comment). Needs nothing but the resolved resources; loads the FFT
 * backend itself. Throws DesignUnitsError for values the engine cannot use, RangeError for inconsistent
 * resources, and whatever `signal.throwIfAborted()` throws when cancelled.
 */
export async function runDesign(design: Design, resources: DesignResources, options: RunOptions = {}): Promise<DesignRun> {
  const { signal } = options;
  const timings: Record<string, number> = {};
  let clock = Date.now();
  const lap = (stage: string) => {
    const now = Date.now();
    timings[stage] = (timings[stage] ?? 0) + now - clock;
    clock = now;
  };
  await initFft();
  const grid = cellGridOf(design);
  const { n } = grid;
  const count = n * n;
  const library = resources.library;
  const illumination = illuminationOf(design);
  const pair = polarizationPairOf(design);
  const inputs: Record<InputId, JonesVector> = { a: normalizeJones(pair.a), b: normalizeJones(pair.b), extra: normalizeJones(jonesVectorOf(design.simulation.extraInput)) };
  const analyser: [JonesVector, JonesVector] = [conjugateJones(inputs.a), conjugateJones(inputs.b)];
  const plans: Record<ChannelId, ChannelPlan> = { a: planChannel(design, 'a', resources, options.memory), b: planChannel(design, 'b', resources, options.memory) };
  const hologramChannels = CHANNEL_IDS.filter((c) => plans[c].hologram);
  const needsPropagation = CHANNEL_IDS.some((c) => plans[c].beam || plans[c].focalLength || plans[c].hologram?.geometry === 'fresnel');
  const stages = ['prepare'];
  if (hologramChannels.length) stages.push('phase retrieval');
  stages.push('jones synthesis', 'atom mapping', 'simulation');
  if (needsPropagation) stages.push('beam propagation');
  stages.push('design rules');
  const report = stagedProgress(options.onProgress, stages);
  report('prepare', 1);
  lap('prepare');

  // 2. Phase retrieval (possibly on other threads) while this thread builds the atom lookup.
  const { memory } = options;
  const jobs: RetrievalJob[] = hologramChannels.map((c) => ({ channel: c, options: { ...plans[c].hologram!.options, memory } }));
  const jobFractions = new Float64Array(jobs.length);
  const retrieving = jobs.length
    ? (resources.retrieveChannels ?? retrieveSequentially)(jobs, {
        signal,
        onProgress: (job, fraction, detail) => {
          jobFractions[job] = fraction;
          const mean = jobFractions.reduce((s, v) => s + v, 0) / jobs.length;
          report('phase retrieval', mean, { ...detail, channel: CHANNEL_IDS.indexOf(jobs[job].channel), channelFraction: fraction });
        },
      })
    : Promise.resolve([] as RetrievalResult[]);
  const lookup = buildAtomLookup(library);
  const retrieved = await retrieving;
  signal?.throwIfAborted();
  lap('phase retrieval');
  const phases = {} as Record<ChannelId, Float64Array>;
  const retrievals = {} as Record<ChannelId, RetrievalResult | null>;
  for (const c of CHANNEL_IDS) {
    const j = jobs.findIndex((job) => job.channel === c);
    retrievals[c] = j >= 0 ? retrieved[j] : null;
    const analytic = plans[c].analyticPhase;
    const hologramPhase = retrievals[c]?.phase;
    // retrievePhase already returns phases in (−π, π].
    phases[c] = analytic && hologramPhase ? sumPhaseMaps(n, [analytic, hologramPhase]) : (hologramPhase ?? analytic)!;
  }

  // 3–4. Jones synthesis and decomposition, atom mapping.
  const decomposition = synthesizeDecomposition(phases.a, phases.b, pair, { signal, memory, onProgress: (f) => report('jones synthesis', f) });
  lap('jones synthesis');
  const mapped = mapAtoms(decomposition, library, { allowAxisSwap: true, complexError: false, lookup, signal, memory, onProgress: (f) => report('atom mapping', f) });
  const mapping = { atomIndex: mapped.atomIndex, theta: mapped.theta, cost: mapped.cost };
  const mappingMetrics = mappingStatistics(mapped.atomIndex, mapped.cost, mapped.swapped, library, { circularPair: design.polarization.kind === 'circular' });
  const mappingDetail = mappingReport(mapped.atomIndex, mapped.cost, library);
  lap('atom mapping');
  options.onLayout?.({ design, grid, decomposition, mapping, library, phases });

  // 5. The realized device (the atoms' own t and α, device-preview.ts) under the three inputs.
  const amplitude = illumination.kind === 'flat' ? null : illuminationAmplitude(grid, illumination);
  const power = amplitude ? incidentPower(amplitude) : count;
  const farFields = {} as Record<InputId, FarFieldSet>;
  const ownOutput = {} as Record<ChannelId, Field32>;
  const fresnelImages: Record<ChannelId, { intensity: Float32Array; wanted: Float32Array; unwanted: Float32Array } | null> = { a: null, b: null };
  const scratch = createPreviewScratch(n);
  const placed = { atomIndex: mapping.atomIndex, theta: mapping.theta, library };
  for (let s = 0; s < INPUT_IDS.length; s++) {
    signal?.throwIfAborted();
    const id = INPUT_IDS[s];
    const fresnel = id !== 'extra' && plans[id].hologram?.geometry === 'fresnel';
    const keep: [boolean, boolean] = id === 'extra' ? [false, false] : fresnel ? [true, true] : [id === 'a', id === 'b'];
    const { farField: set, nearFields } = previewDevice(placed, { grid, amplitude, input: inputs[id], analyser, scratch, keepNearFields: keep, memory });
    farFields[id] = set;
    if (id !== 'extra') {
      const own = id === 'a' ? 0 : 1;
      ownOutput[id] = nearFields[own]!;
      const hologram = plans[id].hologram;
      if (fresnel && hologram) {
        const z = hologram.fresnelDistance!;
        const imagePlane = (field: Field32) => intensity32(new AngularSpectrumPropagator(toField64(field), grid, { padding: design.simulation.padding }).propagate(z));
        const wanted = imagePlane(nearFields[own]!);
        const unwanted = imagePlane(nearFields[1 - own]!);
        const intensity = new Float32Array(count);
        for (let i = 0; i < count; i++) intensity[i] = wanted[i] + unwanted[i];
        fresnelImages[id] = { intensity, wanted, unwanted };
      }
    }
    report('simulation', (s + 1) / INPUT_IDS.length);
  }
  lap('simulation');
  if (options.onFarFields) {
    const windows: Partial<Record<ChannelId, PixelWindow>> = {};
    for (const c of CHANNEL_IDS) if (plans[c].hologram?.geometry === 'fourier') windows[c] = plans[c].hologram!.target.window;
    options.onFarFields({ grid, farFields, analyser, windows });
  }

  // 6. Beam channels, lens foci.
  const beams: Record<ChannelId, BeamAnalysis | null> = { a: null, b: null };
  const foci: Record<ChannelId, FocusAnalysis | null> = { a: null, b: null };
  const propagationChannels = CHANNEL_IDS.filter((c) => plans[c].beam || plans[c].focalLength);
  propagationChannels.forEach((c, index) => {
    const plan = plans[c];
    const sub = (f: number) => report('beam propagation', (index + f) / propagationChannels.length);
    const field = toField64(ownOutput[c]);
    if (plan.beam) {
      const z = beamPlanes(plan.beam, beamPlanesOf(design));
      beams[c] = analyzeBeam(field, grid, plan.beam, z, { padding: design.simulation.padding, signal, onProgress: sub });
    } else if (plan.focalLength) {
      const ideal: ComplexField = { n, re: new Float64Array(count), im: new Float64Array(count) };
      for (let i = 0; i < count; i++) {
        const a = amplitude ? amplitude[i] : 1;
        ideal.re[i] = a * Math.cos(phases[c][i]);
        ideal.im[i] = a * Math.sin(phases[c][i]);
      }
      const radius = Math.min((n * grid.period) / 2, illumination.kind === 'gaussian' ? illumination.waist : Infinity);
      foci[c] = analyzeFocus(field, ideal, grid, plan.focalLength, radius, plan.charge, { padding: design.simulation.padding, signal, onProgress: sub });
    }
  });
  if (needsPropagation) report('beam propagation', 1);
  lap('beam propagation');

  // 7. Design rules.
  const drc = checkDesignRules(
    { n, period: grid.period, atomIndex: mapping.atomIndex, theta: mapping.theta, library },
    designRulesOf(design),
    { maxViolations: 200, signal, onProgress: (f) => report('design rules', f) },
  );
  lap('design rules');

  // Metrics.
  const channels = {} as Record<ChannelId, ChannelOutcome>;
  const channelMetrics = {} as Record<ChannelId, MetricGroup>;
  const zeroRadius = zeroOrderRadius(grid, illumination);
  for (const c of CHANNEL_IDS) {
    const plan = plans[c];
    const other: ChannelId = c === 'a' ? 'b' : 'a';
    const own = farFields[c];
    const group: MetricGroup = {};
    const fidelity = realizedChannelFidelity(ownOutput[c], phases[c], amplitude, power);
    const levels = equivalentPhaseLevels(fidelity.phaseRmsError);
    group.wantedStatePower = metric(fidelity.wantedStateFraction, 'fraction', "power leaving the device in this channel's output state under this channel's input / incident power");
    group.wavefrontEfficiency = metric(
      fidelity.overlapEfficiency,
      'fraction',
      "|⟨ideal a·e^{iφ} | realized output⟩|² / incident power²: share of the incident power in the designed wavefront (mapping, loss and quantization included)",
    );
    group.phaseRmsError = metric(fidelity.phaseRmsError, 'rad', 'intensity-weighted RMS of the realized minus designed channel phase, common offset removed');
    group.equivalentPhaseLevels = metric(levels, 'count', 'number of equal phase levels whose quantization error π/(L√3) equals that RMS phase error');
    group.blazedEfficiencyBound = metric(blazedEfficiency(levels), 'fraction', 'sinc²(1/L) first-order efficiency of an L-level blazed profile at those levels (Swanson 1989)');
    group.zeroOrder = metric(
      zeroOrderFraction(own.total, n, power, zeroRadius),
      'fraction',
      `far-field power within ${zeroRadius.toFixed(1)} px of the zero order / incident power, under this channel's input`,
    );
    const outcome: ChannelOutcome = {
      plan,
      phase: phases[c],
      retrieval: retrievals[c]
        ? { fourierError: retrievals[c]!.fourierError, windowError: retrievals[c]!.windowError, windowEfficiency: retrievals[c]!.windowEfficiency }
        : null,
      targetIntensity: null,
      window: null,
      beam: beams[c],
      focus: foci[c],
      fresnelImage: fresnelImages[c]?.intensity ?? null,
      screenView: plan.hologram?.screen ? screenView(own.total, grid, plan.hologram.screen) : null,
    };
    const hologram = plan.hologram;
    if (hologram) {
      const target = squared32(hologram.target.amplitude);
      outcome.targetIntensity = target;
      outcome.window = hologram.target.window;
      const retrieval = retrievals[c]!;
      const last = retrieval.iterations - 1;
      group.designEfficiency = metric(retrieval.windowEfficiency[last], 'fraction', 'window efficiency of the retrieved phase-only design before atom mapping (last GS iteration)');
      group.retrievalError = metric(retrieval.windowError[last], 'fraction', 'RMS amplitude error in the window after the best overall scale, last GS iteration');
      if (hologram.geometry === 'fourier') {
        const wanted = c === 'a' ? own.analyserA : own.analyserB;
        const unwanted = c === 'a' ? own.analyserB : own.analyserA;
        Object.assign(group, hologramMetrics(own.total, wanted, unwanted, target, n, hologram.target.window, power, 'far field'));
        const otherHologram = plans[other].hologram;
        if (otherHologram?.geometry === 'fourier') {
          group.ghostImage = metric(
            crosstalkDb(windowPower(own.total, n, hologram.target.window), windowPower(own.total, n, otherHologram.target.window)),
            'dB',
            "10·log10(power in the other channel's window / power in this channel's window), total far field under this channel's input",
          );
        }
      } else {
        const image = fresnelImages[c]!;
        Object.assign(group, hologramMetrics(image.intensity, image.wanted, image.unwanted, target, n, hologram.target.window, power, `image plane at ${formatLength(hologram.fresnelDistance)}`));
      }
    }
    const beam = beams[c];
    if (beam) {
      const { spec } = beam;
      const kind = beam.featureRadius.kind;
      group.sinBeta = metric(spec.sinBeta, '', 'sin β = k_r/k of the axicon, β the cone half-angle');
      group.topologicalCharge = metric(spec.charge, 'count', 'sum of the vortex charges ℓ of the channel');
      group[`${kind}RadiusMeasured`] = metric(
        beam.featureRadius.measured,
        'm',
        kind === 'core'
          ? `first minimum of the radial profile at z = ${formatLength(beam.profile.z)} (mid-range)`
          : `first maximum of the radial profile at z = ${formatLength(beam.profile.z)} (mid-range)`,
      );
      group[`${kind}RadiusFormula`] = metric(
        beam.featureRadius.formula,
        'm',
        kind === 'core' ? '2.404826/(k sinβ), first zero of J₀ (Abramowitz & Stegun Table 9.5)' : "j'_{ℓ,1}/(k sinβ), first maximum of J_ℓ (Abramowitz & Stegun Table 9.5)",
      );
      group[`${kind}RadiusRelativeError`] = metric(beam.featureRadius.measured / beam.featureRadius.formula - 1, 'fraction', 'measured / formula − 1');
      group.nonDiffractingLengthMeasured = metric(
        beam.nonDiffractingLength.measured,
        'm',
        `distance where the ${spec.charge === 0 ? 'on-axis' : 'ring'} intensity falls below half its peak, beyond the peak (x–z planes)`,
      );
      group.nonDiffractingLengthFormula = metric(beam.nonDiffractingLength.formula, 'm', 'R/tanβ for the illuminated aperture radius R (Durnin 1987)');
      group.profileCorrelation = metric(beam.profileCorrelation, '', `Pearson correlation of the measured radial profile with J_ℓ²(k sinβ r) at mid-range`);
    }
    const focus = foci[c];
    if (focus) {
      group.focalLength = metric(focus.focalLength, 'm', 'focal length f of the lens term');
      group.numericalAperture = metric(focus.numericalAperture, '', 'sin(atan(R/f)) of the illuminated aperture');
      group.focalSpotZeroMeasured = metric(
        focus.measuredFirstZero,
        'm',
        'distance from the focal peak to the first zero of the intensity along x through it at z = f (cut sampled 40 times per λf/D)',
      );
      // Beyond the paraxial range the zero moves out to λ/(2 sin θ) for the edge ray's angle θ (angular-spectrum picture).
      const edge = (n * grid.period) / 2 / Math.hypot((n * grid.period) / 2, focus.focalLength);
      group.focalSpotZeroSquare = metric(
        focus.squareApertureZero,
        'm',
        `first zero λf/D of the square device aperture (paraxial, Goodman §4.4.1); λ/(2 sin θ) = ${((grid.lambda / (2 * edge)) * 1e6).toFixed(3)} µm for the edge ray at this NA`,
      );
      group.focalSpotRadiusAiry = metric(focus.airyRadius, 'm', 'Airy first zero 0.61 λ/NA of a circular aperture of radius D/2, for reference (Born & Wolf §8.5)');
      group.strehlVsDesign = metric(focus.strehlVsDesign, '', 'focal peak intensity of the realized device / that of the ideal designed phase');
    }
    channels[c] = outcome;
    channelMetrics[c] = group;
  }

  const extra = farFields.extra;
  const extraInput: MetricGroup = {
    zeroOrder: metric(zeroOrderFraction(extra.total, n, power, zeroRadius), 'fraction', 'far-field power near the zero order / incident power, under the third input'),
  };
  for (const c of CHANNEL_IDS) {
    const window = channels[c].window;
    if (window && plans[c].hologram?.geometry === 'fourier') {
      extraInput[`efficiency${c.toUpperCase()}`] = metric(
        signalEfficiency(extra.total, n, window, power),
        'fraction',
        `power in channel ${c.toUpperCase()}'s window / incident power, under the third input`,
      );
    }
  }

  const run: MetricGroup = {
    cells: metric(n, 'count', 'cells per side N'),
    period: metric(grid.period, 'm', 'lattice period P'),
    wavelength: metric(grid.lambda, 'm', 'design wavelength λ'),
    aperture: metric(n * grid.period, 'm', 'device side N·P'),
    directionCosineStep: metric(directionCosineStep(grid), '', 'far-field pixel in direction cosines, Δu = λ/(N·P)'),
    incidentPower: metric(power, '', 'Σ a² over the cells (one cell lit at |E| = 1 counts 1), the reference of every efficiency'),
  };
  const designRules: MetricGroup = {
    gapViolations: metric(drc.counts.gap, 'count', 'neighbour pairs closer than the minimum gap'),
    featureViolations: metric(drc.counts.feature, 'count', 'pillars with a side below the minimum feature'),
    aspectRatioViolations: metric(drc.counts['aspect-ratio'], 'count', 'pillars taller than the maximum aspect ratio allows'),
    closestGap: metric(drc.closestGap ?? NaN, 'm', 'smallest gap between neighbouring pillars when below twice the minimum gap (null: all wider)'),
  };

  return {
    design,
    grid,
    pair,
    inputs,
    analyser,
    channels,
    decomposition,
    mapping,
    farFields,
    drc,
    library,
    metrics: { run, channels: channelMetrics, extraInput, mapping: mappingMetrics, designRules },
    mappingReport: mappingDetail,
    timings,
  };
}

/**
 * a² per value as float32, in a plain loop: `Float32Array.from(a, (v) => v * v)` first lists every value in a
 * JavaScript array, ≈ 730 MiB passing through the heap for a 4096² plane. Example: squared32([2, 3]) → [4, 9].
 */
function squared32(values: ArrayLike<number>): Float32Array {
  const out = new Float32Array(values.length);
  for (let i = 0; i < out.length; i++) out[i] = values[i] * values[i];
  return out;
}

function intensity32(field: ComplexField): Float32Array {
  const out = new Float32Array(field.re.length);
  for (let i = 0; i < out.length; i++) out[i] = field.re[i] * field.re[i] + field.im[i] * field.im[i];
  return out;
}

/**
 * Statistics of an atom mapping: mean mapping error, mean power transmission and, for a circular pair only,
 * retardance far from π and the unconverted share of circular light (the part that feeds the zero order in
 * a circular-basis design; for a linear or elliptical pair neither says anything about the device).
 */
export function mappingStatistics(
  atomIndex: Int32Array,
  cost: Float32Array,
  swapped: Uint8Array,
  library: AtomLibrary,
  options: { circularPair: boolean } = { circularPair: true },
): MetricGroup {
  const k = library.atoms.length;
  const used = atomUsage(atomIndex, k);
  const cells = atomIndex.length;
  let costSum = 0;
  let swappedCount = 0;
  for (let i = 0; i < cells; i++) {
    costSum += cost[i];
    swappedCount += swapped[i];
  }
  let transmission = 0;
  let farFromPi = 0;
  let unconverted = 0;
  let distinct = 0;
  library.atoms.forEach((atom, j) => {
    const u = used[j];
    if (u === 0) return;
    distinct++;
    transmission += (u * (atom.tx * atom.tx + atom.ty * atom.ty)) / 2;
    const retardance = atom.alphaX - atom.alphaY;
    if (Math.abs(wrapPhase(retardance - Math.PI)) > RETARDANCE_THRESHOLD) farFromPi += u;
    // Circular input through R(θ)·diag(A, B)·R(θ)ᵀ keeps |(A + B)/2|² in its own state; normalized by (|A|² + |B|²)/2.
    const sumRe = atom.tx * Math.cos(atom.alphaX) + atom.ty * Math.cos(atom.alphaY);
    const sumIm = atom.tx * Math.sin(atom.alphaX) + atom.ty * Math.sin(atom.alphaY);
    const total = atom.tx * atom.tx + atom.ty * atom.ty;
    if (total > 0) unconverted += (u * (sumRe * sumRe + sumIm * sumIm)) / (2 * total);
  });
  const circular: MetricGroup = {
    retardanceFarFromPi: metric(
      farFromPi / cells,
      'fraction',
      'share of cells whose atom retardance αx − αy is more than π/4 from π (their light partly keeps its circular state and feeds the zero order)',
    ),
    unconvertedCircular: metric(unconverted / cells, 'fraction', 'mean share of transmitted circular light left in its own handedness, |A + B|²/(2(|A|² + |B|²))'),
  };
  return {
    meanError: metric(costSum / cells, '', 'mean over cells of |tx e^{iαx} − e^{iδx}|² + |ty e^{iαy} − e^{iδy}|² of the chosen atom (0 = exact)'),
    meanTransmission: metric(transmission / cells, 'fraction', 'mean over cells of the chosen atom power transmission (tx² + ty²)/2'),
    ...(options.circularPair ? circular : {}),
    distinctAtoms: metric(distinct, 'count', `different atoms used, of ${k} in the library`),
    axisSwapped: metric(swappedCount / cells, 'fraction', 'share of cells whose atom is placed turned by 90° (δx and δy exchanged)'),
  };
}
