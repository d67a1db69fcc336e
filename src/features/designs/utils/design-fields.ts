import { TERM_PARAMETER_NAMES } from '@shared/display-names';
import { assetName, valueWords } from '@shared/design-values';
import { getIn, termKindLabel, type TermKind } from '@/features/designs/utils/design-draft';

interface FieldLabel {
  label: string;
  unit?: string;
}

const TOP_FIELDS: Record<string, FieldLabel> = {
  '': { label: 'Design' },
  format: { label: 'File format' },
  name: { label: 'Design name' },
  'setup.wavelengthNm': { label: 'Wavelength λ', unit: 'nm' },
  'setup.periodNm': { label: 'Lattice period P', unit: 'nm' },
  'setup.cells': { label: 'Cells per side N', unit: 'cells' },
  'setup.illumination': { label: 'Illumination' },
  'setup.illumination.kind': { label: 'Illumination' },
  'setup.illumination.waistUm': { label: 'Gaussian waist w', unit: 'µm' },
  'setup.platform': { label: 'Platform note' },
  'setup.lightFrom': { label: 'Light enters' },
  polarization: { label: 'Polarization pair' },
  'polarization.kind': { label: 'Kind of polarization pair' },
  'polarization.angleDeg': { label: 'Angle ψ of state A', unit: '°' },
  'polarization.handedness': { label: 'Handedness of state A' },
  'polarization.psiDeg': { label: 'Orientation ψ of state A', unit: '°' },
  'polarization.chiDeg': { label: 'Ellipticity χ of state A', unit: '°' },
  atomLibrary: { label: 'Atom library' },
  'atomLibrary.source': { label: 'Atom library' },
  'atomLibrary.id': { label: 'Stored atom library (number)' },
  'atomLibrary.path': { label: 'Atom library file' },
  simulation: { label: 'Simulation' },
  'simulation.extraInput': { label: 'Third input' },
  'simulation.extraInput.kind': { label: 'Third input, kind' },
  'simulation.extraInput.angleDeg': { label: 'Third input, angle ψ', unit: '°' },
  'simulation.extraInput.handedness': { label: 'Third input, handedness' },
  'simulation.extraInput.psiDeg': { label: 'Third input, orientation ψ', unit: '°' },
  'simulation.extraInput.chiDeg': { label: 'Third input, ellipticity χ', unit: '°' },
  'simulation.beamZUm': { label: 'Beam slice planes' },
  'simulation.beamZUm.start': { label: 'Beam slice from z', unit: 'µm' },
  'simulation.beamZUm.end': { label: 'Beam slice to z', unit: 'µm' },
  'simulation.beamZUm.steps': { label: 'Beam slice planes', unit: 'planes' },
  'simulation.padding': { label: 'Zero-padding factor', unit: '×' },
  layout: { label: 'Layout' },
  'layout.layer': { label: 'GDSII layer' },
  'layout.datatype': { label: 'GDSII datatype' },
  designRules: { label: 'Design rules' },
  'designRules.minGapNm': { label: 'Smallest gap between pillars', unit: 'nm' },
  'designRules.minFeatureNm': { label: 'Smallest feature', unit: 'nm' },
  'designRules.maxAspectRatio': { label: 'Largest aspect ratio', unit: '' },
};

const TERM_FIELDS: Record<string, FieldLabel> = {
  '': { label: 'term' },
  kind: { label: 'kind of term' },
  image: { label: 'target picture' },
  'image.source': { label: 'target picture' },
  'image.name': { label: 'demo picture' },
  'image.id': { label: 'uploaded picture' },
  'image.path': { label: 'picture file' },
  window: { label: 'far-field window' },
  'window.units': { label: 'window units' },
  'window.width': { label: 'window width' },
  'window.height': { label: 'window height' },
  'window.centerX': { label: 'window centre x' },
  'window.centerY': { label: 'window centre y' },
  gamma: { label: 'gamma', unit: '' },
  algorithm: { label: 'algorithm' },
  iterations: { label: 'iterations', unit: '' },
  seed: { label: 'random seed', unit: '' },
  mixing: TERM_PARAMETER_NAMES.mixing,
  fresnelDistanceUm: { label: 'image distance', unit: 'µm' },
  coneHalfAngleDeg: TERM_PARAMETER_NAMES.coneHalfAngleDeg,
  numericalAperture: TERM_PARAMETER_NAMES.numericalAperture,
  charge: { label: 'topological charge ℓ', unit: '' },
  focalLengthUm: { label: 'focal length f', unit: 'µm' },
  thetaXDeg: { label: 'deflection θx', unit: '°' },
  thetaYDeg: { label: 'deflection θy', unit: '°' },
  seenOn: { label: 'picture seen on' },
  phaseMap: { label: 'phase map' },
  'phaseMap.source': { label: 'phase map' },
  'phaseMap.id': { label: 'uploaded phase map' },
};

const WINDOW_UNITS: Record<string, string> = { degrees: '°', 'direction-cosine': 'sin θ', cells: 'cells' };

export interface DescribedField {
  /** Section heading the field belongs to (e.g. 'Setup', 'Channel A'). */
  section: string;
  /** Words for a person, e.g. 'Channel A, term 2 (Vortex): topological charge ℓ'. */
  label: string;
  /** Short label within its section. */
  shortLabel: string;
  unit?: string;
}

function sectionOf(path: string): string {
  if (path.startsWith('setup') || path === 'name' || path === 'format') return 'Setup';
  if (path.startsWith('polarization')) return 'Polarization pair';
  if (path.startsWith('channels.a')) return 'Channel A';
  if (path.startsWith('channels.b')) return 'Channel B';
  if (path.startsWith('atomLibrary')) return 'Atom library';
  if (path.startsWith('simulation')) return 'Simulation';
  if (path.startsWith('layout')) return 'Layout';
  if (path.startsWith('designRules')) return 'Design rules';
  return 'Design';
}

function capitalize(text: string) {
  return text.charAt(0).toUpperCase() + text.slice(1);
}

/**
 * Words and unit of a dotted design path. `design` (the design the path lives in) resolves the kind of a
 * term and the unit of a far-field window.
 */
export function describeField(path: string, design?: unknown): DescribedField {
  const section = sectionOf(path);
  const channel = /^channels\.([ab])(?:\.(.*))?$/.exec(path);
  if (channel) {
    const channelName = `Channel ${channel[1].toUpperCase()}`;
    const rest = channel[2] ?? '';
    if (rest === '') return { section, label: channelName, shortLabel: channelName };
    if (rest === 'label') return { section, label: `${channelName} label`, shortLabel: 'Label' };
    if (rest === 'terms') return { section, label: `${channelName} terms`, shortLabel: 'Terms' };
    const term = /^terms\.(\d+)(?:\.(.*))?$/.exec(rest);
    if (term) {
      const index = Number(term[1]);
      const kind = getIn(design, ['channels', channel[1], 'terms', index, 'kind']) as TermKind | undefined;
      const termName = `term ${index + 1}${kind ? ` (${termKindLabel(kind)})` : ''}`;
      const field = TERM_FIELDS[term[2] ?? ''] ?? { label: term[2] ?? '' };
      let unit = field.unit;
      if (term[2]?.startsWith('window.') && term[2] !== 'window.units') {
        const units = getIn(design, ['channels', channel[1], 'terms', index, 'window', 'units']);
        unit = WINDOW_UNITS[typeof units === 'string' ? units : 'degrees'];
      }
      const shortLabel = term[2] ? `${capitalize(termName)}: ${field.label}` : capitalize(termName);
      return { section, label: `${channelName}, ${shortLabel.charAt(0).toLowerCase()}${shortLabel.slice(1)}`, shortLabel, unit };
    }
  }
  const known = TOP_FIELDS[path];
  if (known) return { section, label: known.label, shortLabel: known.label, unit: known.unit };
  return { section, label: path, shortLabel: path };
}

const numberFormat = new Intl.NumberFormat(undefined, { maximumSignificantDigits: 6 });

/** What names a value beyond its unit: the field's own key (for enumerated words) and the project's uploads. */
export interface ValueContext {
  /** Last part of the field's path, e.g. 'algorithm'. */
  key?: string;
  /** File names of the project's uploads, by id. */
  uploadNames?: ReadonlyMap<number, string>;
}

/**
 * The key that names a dotted path's value: its last part, or 'upload' for the id of an uploaded picture or map.
 * Example: 'channels.a.terms.0.algorithm' → 'algorithm'; 'channels.a.terms.0.image.id' → 'upload'.
 */
export function valueKey(path: string): string {
  if (/(?:^|\.)(?:image|phaseMap)\.id$/.test(path)) return 'upload';
  return path.slice(path.lastIndexOf('.') + 1);
}

/** A design value in words, with its unit. */
export function formatValue(value: unknown, unit?: string, context: ValueContext = {}): string {
  if (value === undefined) return '—';
  if (value === null) return 'none';
  if (typeof value === 'number') {
    if (context.key === 'upload') return assetName({ source: 'upload', id: value }, context.uploadNames);
    if (!Number.isFinite(value)) return 'not a number';
    const text = numberFormat.format(value);
    if (!unit) return text;
    return unit === '°' || unit === '×' ? `${text}${unit}` : `${text} ${unit}`;
  }
  if (typeof value === 'string') return value === '' ? '(empty)' : (valueWords(context.key ?? '', value) ?? value);
  if (typeof value === 'boolean') return value ? 'yes' : 'no';
  if (Array.isArray(value)) return `${value.length} item${value.length === 1 ? '' : 's'}`;
  if (typeof value === 'object') {
    const record = value as Record<string, unknown>;
    if (typeof record.kind === 'string') return termKindLabel(record.kind as TermKind);
    if (typeof record.source === 'string' && record.source !== 'library') return assetName(record as { source: string }, context.uploadNames);
    return Object.entries(record)
      .map(([key, entry]) => `${key} ${formatValue(entry)}`)
      .join(', ');
  }
  return String(value);
}
