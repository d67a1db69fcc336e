import { decibelText } from '@shared/optics/run-metrics';
import type { RunMetric, RunStatus } from '@shared/schemas/runs';

export const STATUS_LABELS: Record<RunStatus, string> = {
  queued: 'Waiting',
  running: 'Running',
  succeeded: 'Finished',
  failed: 'Failed',
  cancelled: 'Cancelled',
};

const trim = (text: string) => text.replace(/(\.\d*?)0+$/, '$1').replace(/\.$/, '');

export function formatPercent(fraction: number | null | undefined, digits = 1): string {
  return fraction === null || fraction === undefined || !Number.isFinite(fraction) ? '—' : `${(100 * fraction).toFixed(digits)} %`;
}

export function formatDb(value: number | null | undefined): string {
  return value === null || value === undefined || !Number.isFinite(value) ? '—' : decibelText(value);
}

/** A length in metres, in the unit a person reads best: nm below 1 µm, µm below 1 mm, mm above. */
export function formatLength(metres: number | null | undefined): string {
  if (metres === null || metres === undefined || !Number.isFinite(metres)) return '—';
  const size = Math.abs(metres);
  if (size >= 1e-3) return `${trim((metres * 1e3).toPrecision(4))} mm`;
  if (size >= 1e-6 || size === 0) return `${trim((metres * 1e6).toPrecision(4))} µm`;
  return `${trim((metres * 1e9).toPrecision(4))} nm`;
}

export function formatDuration(ms: number | null | undefined): string {
  if (ms === null || ms === undefined || !Number.isFinite(ms)) return '—';
  if (ms < 1000) return `${Math.round(ms)} ms`;
  const seconds = ms / 1000;
  if (seconds < 60) return `${seconds.toFixed(seconds < 10 ? 1 : 0)} s`;
  const minutes = Math.floor(seconds / 60);
  const rest = Math.round(seconds - minutes * 60);
  if (minutes < 60) return `${minutes} min ${rest} s`;
  return `${Math.floor(minutes / 60)} h ${minutes % 60} min`;
}

/** A metric's value with its unit: fractions as %, lengths in nm/µm/mm, dB and rad as they are. */
export function formatMetricValue(metric: RunMetric): string {
  const { value, unit } = metric;
  if (value === null || !Number.isFinite(value)) return 'not defined';
  switch (unit) {
    case 'fraction':
      return formatPercent(value, 2);
    case 'fraction of target peak':
      return `${(100 * value).toFixed(2)} % of target peak`;
    case 'dB':
      return formatDb(value);
    case 'm':
      return formatLength(value);
    case 'rad':
      return `${value.toFixed(4)} rad`;
    case 'count':
      return Number.isInteger(value) ? value.toLocaleString() : value.toFixed(1);
    case 'ratio':
      return value.toFixed(3);
    case 'NA':
      return `NA ${value.toFixed(3)}`;
    default:
      return `${trim(value.toPrecision(4))} ${unit}`;
  }
}

const SECTION_NAMES: Record<string, string> = {
  run: 'Device and grid',
  device: 'Device and grid',
  a: 'Channel A',
  b: 'Channel B',
  extra: 'Extra input',
  extrainput: 'Extra input',
  mapping: 'Atom mapping',
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

export function sectionName(key: string): string {
  const plain = key.replace(/[\s_-]+/g, '').toLowerCase();
  if (SECTION_NAMES[plain]) return SECTION_NAMES[plain];
  const channel = /^(?:channel)?([ab])$/.exec(plain);
  if (channel) return `Channel ${channel[1].toUpperCase()}`;
  return /[A-Z ]/.test(key) ? key.charAt(0).toUpperCase() + key.slice(1) : humanize(key);
}

const METRIC_NAMES: Record<string, string> = {
  efficiency: 'Efficiency into the window',
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
  designEfficiency: 'Design efficiency before mapping',
  retrievalError: 'Retrieval error (last iteration)',
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
  profileCorrelation: 'Profile match to J_ℓ²',
  focalLength: 'Focal length',
  numericalAperture: 'Numerical aperture',
  focalSpotZeroMeasured: 'Focal spot first zero, simulated',
  focalSpotZeroSquare: 'Focal spot first zero, λf/D (square aperture)',
  focalSpotRadiusMeasured: 'Focal spot radius, simulated',
  focalSpotRadiusAiry: 'Focal spot radius, Airy',
  strehlVsDesign: 'Strehl ratio against the design',
  efficiencyA: 'Efficiency into window A',
  efficiencyB: 'Efficiency into window B',
  cells: 'Cells per side N',
  period: 'Lattice period P',
  wavelength: 'Wavelength λ',
  aperture: 'Device side N·P',
  directionCosineStep: 'Far-field pixel',
  incidentPower: 'Incident power',
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

export function metricName(key: string): string {
  return METRIC_NAMES[key] ?? humanize(key);
}
