/**
 * The words a person reads for the keys the engine, the server and the design file use: run states, metric
 * sections, metrics and their units, phase-term parameters, algorithms, preview inputs. Used by the client,
 * the printed report, the fab package's report.html and the command line, so no internal key such as
 * `strehlVsDesign` or `thetaXDeg` reaches a screen or a page. Pure data and string functions: no DOM, no Node API.
 */
import { PHASE_TERM_LABELS, type AssetRef, type PhaseTermSpec } from './schemas/design';
import { decibelText } from './optics/run-metrics';
import type { RunMetric, RunStatus } from './schemas/runs';

export const RUN_STATUS_NAMES: Readonly<Record<RunStatus, string>> = {
  queued: 'Waiting',
  running: 'Running',
  succeeded: 'Finished',
  failed: 'Failed',
  cancelled: 'Cancelled',
};

/** A run's state inside a sentence: "Run 12 is still waiting". */
export const RUN_STATUS_PHRASES: Readonly<Record<RunStatus, string>> = {
  queued: 'still waiting',
  running: 'still running',
  succeeded: 'finished',
  failed: 'failed',
  cancelled: 'cancelled',
};

/** A state in words, for a value typed loosely (e.g. a database row). Example: runStatusPhrase('queued') → 'still waiting'. */
export const runStatusName = (status: string): string => RUN_STATUS_NAMES[status as RunStatus] ?? status;
export const runStatusPhrase = (status: string): string => RUN_STATUS_PHRASES[status as RunStatus] ?? status;

/** The three inputs a run previews: the two states of the pair, and the third state of `simulation.extraInput`. */
export const INPUT_NAMES = { a: 'Input A', b: 'Input B', extra: 'Third input' } as const;

/** The one name of the third preview input, in running text ("under the third input"). */
export const THIRD_INPUT = 'third input';

const SECTION_NAMES: Record<string, string> = {
  run: 'Device and grid',
  device: 'Device and grid',
  a: 'Channel A',
  b: 'Channel B',
  extra: 'Third input',
  extrainput: 'Third input',
  thirdinput: 'Third input',
  mapping: 'Atom mapping',
  atommapping: 'Atom mapping',
  designrules: 'Design rules',
};

/** "camelCase" or "snake_case" → "Camel case". */
export function humanize(key: string): string {
  const words = key
    .replace(/([a-z0-9])([A-Z])/g, '$1 $2')
    .replace(/[_-]+/g, ' ')
    .trim()
    .toLowerCase();
  return words.charAt(0).toUpperCase() + words.slice(1);
}

/** A metrics section key ("channel A", "extra input", "designRules") in words. Example: 'extra input' → 'Third input'. */
export function sectionName(key: string): string {
  const plain = key.replace(/[\s_-]+/g, '').toLowerCase();
  if (SECTION_NAMES[plain]) return SECTION_NAMES[plain];
  const channel = /^(?:channel)?([ab])$/.exec(plain);
  if (channel) return `Channel ${channel[1].toUpperCase()}`;
  return /[A-Z ]/.test(key) ? key.charAt(0).toUpperCase() + key.slice(1) : humanize(key);
}

const METRIC_NAMES: Record<string, string> = {
  efficiency: 'Window efficiency',
  uniformity: 'Uniformity',
  correlation: 'Correlation with the target',
  rmse: 'RMS error against the target',
  crosstalk: 'Crosstalk',
  ghostImage: 'Ghost of the other image',
  zeroOrder: 'Zero order',
  wantedStatePower: 'Power in the wanted output state',
  wavefrontEfficiency: 'Wavefront efficiency',
  phaseRmsError: 'RMS phase error',
  equivalentPhaseLevels: 'Equivalent phase levels',
  blazedEfficiencyBound: 'Blazed-grating efficiency at those levels',
  designEfficiency: 'Window efficiency before mapping',
  retrievalError: 'Retrieval error in the window (last iteration)',
  sinBeta: 'Axicon sin β',
  topologicalCharge: 'Topological charge ℓ',
  coreRadiusMeasured: 'Core radius, simulated',
  coreRadiusFormula: 'Core radius, formula',
  coreRadiusRelativeError: 'Core radius, deviation',
  ringRadiusMeasured: 'Ring radius, simulated',
  ringRadiusFormula: 'Ring radius, formula',
  ringRadiusRelativeError: 'Ring radius, deviation',
  nonDiffractingLengthMeasured: 'Non-diffracting length, simulated',
  nonDiffractingLengthFormula: 'Non-diffracting length, formula',
  profileCorrelation: 'Profile match to the Bessel curve',
  focalLength: 'Focal length f',
  numericalAperture: 'Numerical aperture NA of the lens',
  focalSpotZeroMeasured: 'Focal spot first zero, simulated',
  focalSpotZeroSquare: 'Focal spot first zero, expected λf/D (square aperture)',
  focalSpotRadiusMeasured: 'Focal spot first zero, simulated',
  focalSpotRadiusAiry: 'Airy radius 0.61 λ/NA (circular aperture, for reference)',
  strehlVsDesign: 'Strehl ratio against the design',
  efficiencyA: 'Window efficiency A',
  efficiencyB: 'Window efficiency B',
  cells: 'Cells per side N',
  period: 'Lattice period P',
  wavelength: 'Wavelength λ',
  aperture: 'Device side N·P',
  directionCosineStep: 'Far-field pixel Δu = λ/(N·P)',
  incidentPower: 'Incident power (cells × |E|², reference of every efficiency)',
  meanError: 'Mean mapping error',
  meanTransmission: 'Mean transmission',
  retardanceFarFromPi: 'Retardance far from π',
  unconvertedCircular: 'Unconverted circular light',
  distinctAtoms: 'Distinct atoms used',
  axisSwapped: 'Atoms turned by 90°',
  gapViolations: 'Gap violations',
  featureViolations: 'Feature-size violations',
  aspectRatioViolations: 'Aspect-ratio violations',
  closestGap: 'Closest gap',
};

/** A metric key in words. Example: metricName('strehlVsDesign') → 'Strehl ratio against the design'. */
export function metricName(key: string): string {
  return METRIC_NAMES[key] ?? humanize(key);
}

const trim = (text: string) => (text.includes('.') && !text.includes('e') ? text.replace(/\.?0+$/, '') : text);
const minus = (text: string) => text.replace(/^-/, '−');

export function formatPercent(fraction: number | null | undefined, digits = 1): string {
  return fraction === null || fraction === undefined || !Number.isFinite(fraction) ? '—' : minus(`${(100 * fraction).toFixed(digits)} %`);
}

/** A power ratio in dB; below the computation's floor (−100 dB) it reads "below −100 dB" (run-metrics.ts). */
export function formatDb(value: number | null | undefined): string {
  return value === null || value === undefined || !Number.isFinite(value) ? '—' : minus(decibelText(value));
}

/**
 * A length in metres, in the unit a person reads best: nm below 1 µm, µm below 1 mm, mm above; four
 * significant digits. Example: formatLength(1.5e-3) → '1.5 mm'; formatLength(2.05e-6) → '2.05 µm'.
 */
export function formatLength(metres: number | null | undefined): string {
  if (metres === null || metres === undefined || !Number.isFinite(metres)) return '—';
  const size = Math.abs(metres);
  if (size >= 1e-3) return minus(`${trim((metres * 1e3).toPrecision(4))} mm`);
  if (size >= 1e-6 || size === 0) return minus(`${trim((metres * 1e6).toPrecision(4))} µm`);
  return minus(`${trim((metres * 1e9).toPrecision(4))} nm`);
}

/**
 * Units that are not units: ratios, direction cosines, sums of |E|² over cells, and the 'NA' older runs
 * stored for sin β. Their values are plain numbers.
 */
const DIMENSIONLESS = new Set(['', '1', 'ratio', 'NA', 'direction cosine', 'cell·|E|²', '|t|²']);

/** A metric's value with its unit: fractions in %, lengths in nm/µm/mm, dB and rad as they are, pure numbers bare. */
export function formatMetricValue(metric: RunMetric): string {
  const { value, unit } = metric;
  if (value === null || !Number.isFinite(value)) return 'not defined';
  switch (unit) {
    case 'fraction':
      return formatPercent(value, 2);
    case 'fraction of target peak':
      return minus(`${(100 * value).toFixed(2)} % of the target peak`);
    case 'dB':
      return formatDb(value);
    case 'm':
      return formatLength(value);
    case 'rad':
      return minus(`${value.toFixed(4)} rad`);
    case 'count':
      return Number.isInteger(value) ? value.toLocaleString('en-GB') : value.toFixed(1);
  }
  if (DIMENSIONLESS.has(unit)) return minus(Math.abs(value) >= 1e4 ? value.toPrecision(4) : trim(value.toPrecision(4)));
  return minus(`${trim(value.toPrecision(4))} ${unit}`);
}

/** Names of the phase-retrieval algorithms of an image hologram. */
export const ALGORITHM_NAMES: Readonly<Record<string, string>> = {
  gs: 'Gerchberg–Saxton',
  'weighted-gs': 'weighted Gerchberg–Saxton',
  mraf: 'MRAF',
};

/** Where a far-field picture is looked at (`seenOn`). */
export const SEEN_ON_NAMES: Readonly<Record<string, string>> = {
  'far-field': 'in the far field (even in sin θ)',
  'flat-screen': 'on a flat screen facing the device',
};

/** Units of a far-field window. */
export const WINDOW_UNIT_NAMES: Readonly<Record<string, string>> = { degrees: '°', 'direction-cosine': 'sin θ', cells: 'far-field pixels' };

/** A phase-term parameter: its name and the unit its value is written in. */
export interface ParameterName {
  label: string;
  unit?: string;
}

/** Parameters of the phase terms, by their key in the design file. */
export const TERM_PARAMETER_NAMES: Readonly<Record<string, ParameterName>> = {
  image: { label: 'target picture' },
  window: { label: 'far-field window' },
  gamma: { label: 'gamma', unit: '' },
  algorithm: { label: 'algorithm' },
  iterations: { label: 'iterations', unit: '' },
  seed: { label: 'random seed', unit: '' },
  mixing: { label: 'MRAF target weight m', unit: '' },
  fresnelDistanceUm: { label: 'image distance', unit: 'µm' },
  seenOn: { label: 'seen' },
  coneHalfAngleDeg: { label: 'cone half-angle β', unit: '°' },
  numericalAperture: { label: 'sin β of the cone', unit: '' },
  charge: { label: 'topological charge ℓ', unit: '' },
  focalLengthUm: { label: 'focal length f', unit: 'µm' },
  thetaXDeg: { label: 'deflection θx', unit: '°' },
  thetaYDeg: { label: 'deflection θy', unit: '°' },
  phaseMap: { label: 'phase map' },
  'window.units': { label: 'window units' },
  'window.width': { label: 'window width' },
  'window.height': { label: 'window height' },
  'window.centerX': { label: 'window centre x' },
  'window.centerY': { label: 'window centre y' },
};

const number = (v: number) => minus(trim(v.toPrecision(4)));
const withUnit = (v: number, unit: string | undefined) => (unit ? (unit === '°' ? `${number(v)}°` : `${number(v)} ${unit}`) : number(v));

/** A picture or phase map reference in words; `uploadName` names an upload by its file name when known. */
export function assetText(ref: AssetRef, uploadName?: (id: number) => string | undefined): string {
  if (ref.source === 'demo') return `demo picture “${ref.name}”`;
  if (ref.source === 'upload') return uploadName?.(ref.id) ?? `uploaded file #${ref.id}`;
  return ref.path;
}

/**
 * One phase term in words, every parameter by its display name and unit.
 * Example: { kind: 'tilt', thetaXDeg: 10, thetaYDeg: 0 } → 'tilt: deflection θx 10°, deflection θy 0°'.
 */
export function termText(term: PhaseTermSpec, uploadName?: (id: number) => string | undefined): string {
  const parts: string[] = [];
  for (const [key, value] of Object.entries(term)) {
    if (key === 'kind' || value === undefined) continue;
    if (key === 'mixing' && term.kind === 'hologram' && term.algorithm !== 'mraf') continue;
    const name = TERM_PARAMETER_NAMES[key] ?? { label: humanize(key).toLowerCase() };
    if (key === 'image' || key === 'phaseMap') parts.push(`${name.label} ${assetText(value as AssetRef, uploadName)}`);
    else if (key === 'window') {
      const w = value as { units: string; width: number; height?: number; centerX: number; centerY: number };
      const unit = WINDOW_UNIT_NAMES[w.units] ?? w.units;
      const size = `${withUnit(w.width, unit)}${w.height !== undefined ? ` × ${withUnit(w.height, unit)}` : ' wide'}`;
      parts.push(`${name.label} ${size} centred at (${withUnit(w.centerX, unit)}, ${withUnit(w.centerY, unit)})`);
    } else if (key === 'algorithm') parts.push(`${name.label} ${ALGORITHM_NAMES[String(value)] ?? String(value)}`);
    else if (key === 'seenOn') parts.push(`${name.label} ${SEEN_ON_NAMES[String(value)] ?? String(value)}`);
    else if (typeof value === 'number') parts.push(`${name.label} ${withUnit(value, name.unit)}`);
    else parts.push(`${name.label} ${String(value)}`);
  }
  return `${PHASE_TERM_LABELS[term.kind]}${parts.length ? `: ${parts.join(', ')}` : ''}`;
}
