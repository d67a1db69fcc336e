/**
 * From an engine run to what a run row stores and shows: metrics grouped by section, the headline figures
 * of the runs table, plot data, the GS convergence curves, a label and type for every output file, and
 * error messages a designer can act on. Pure functions; the worker thread calls them.
 */
import { DesignUnitsError } from '../../../shared/optics/design-units';
import type { DesignRun } from '../../../shared/optics/pipeline';
import { TERM_PARAMETER_NAMES, THIRD_INPUT } from '../../../shared/display-names';
import { PHASE_TERM_LABELS, type Design } from '../../../shared/schemas/design';
import type { RunHeadline, RunMetric } from '../../../shared/schemas/runs';
import { InputError } from '../../cli/design-files';
import { metricsRecord } from '../../cli/outputs';

export type MetricSections = Record<string, Record<string, RunMetric>>;

/** Sections as shown in the preview: run, channel A, channel B, third input (key 'extra input'), atom mapping, design rules. */
export function metricSections(run: DesignRun): MetricSections {
  const m = run.metrics;
  return {
    run: m.run,
    'channel A': m.channels.a,
    'channel B': m.channels.b,
    'extra input': m.extraInput,
    'atom mapping': m.mapping,
    'design rules': m.designRules,
  };
}

const valueOf = (group: Record<string, RunMetric> | undefined, key: string): number | null => group?.[key]?.value ?? null;

/**
 * The runs-table figures: efficiency per channel (into the target window for holograms, into the designed
 * wavefront otherwise), the worse crosstalk of the two channels and the larger zero-order fraction.
 */
export function headlineOf(sections: MetricSections): RunHeadline {
  const a = sections['channel A'];
  const b = sections['channel B'];
  const efficiency = (g: Record<string, RunMetric>) => valueOf(g, 'efficiency') ?? valueOf(g, 'wavefrontEfficiency');
  const worst = (x: number | null, y: number | null) => (x === null ? y : y === null ? x : Math.max(x, y));
  return {
    efficiencyA: efficiency(a),
    efficiencyB: efficiency(b),
    crosstalkDb: worst(valueOf(a, 'crosstalk'), valueOf(b, 'crosstalk')),
    zeroOrder: worst(valueOf(a, 'zeroOrder'), valueOf(b, 'zeroOrder')),
  };
}

/** Plot data of the preview: GS curves in full, beam and focus profiles, design-rule findings, stage timings. */
export function plotsOf(run: DesignRun): Record<string, unknown> {
  const record = metricsRecord(run);
  return {
    convergence: record.convergence,
    beams: record.beams,
    foci: record.foci,
    designRules: { violations: record.designRuleViolations, truncated: record.designRuleViolationsTruncated },
    notes: record.notes,
    timingsMs: record.timingsMs,
    mappingReport: run.mappingReport,
    pictures: record.pictures,
  };
}

/** GS error (Fienup's Fourier-domain error) per iteration of each hologram channel; [] for analytic channels. */
export function convergenceOf(run: DesignRun): { a: number[]; b: number[] } {
  const curve = (c: 'a' | 'b') => Array.from(run.channels[c].retrieval?.fourierError ?? [], (v) => (Number.isFinite(v) ? v : 0));
  return { a: curve('a'), b: curve('b') };
}

const inputWords = (input: string) => (input === 'extra' ? `the ${THIRD_INPUT}` : `input ${input.toUpperCase()}`);

const ARTIFACTS: [RegExp, string, (m: RegExpExecArray) => string][] = [
  [/^phase_([ab])\.npy$/, 'application/x-npy', (m) => `Channel ${m[1].toUpperCase()} phase φ, rad, float64 N×N (numpy)`],
  [/^delta_([xy])\.npy$/, 'application/x-npy', (m) => `Propagation phase δ${m[1]} per cell, rad, float64 N×N (numpy)`],
  [/^theta\.npy$/, 'application/x-npy', () => 'Rotation θ per cell, rad, float64 N×N (numpy)'],
  [/^atom_index\.npy$/, 'application/x-npy', () => 'Chosen atom per cell, int32 N×N, rows of atoms.csv (numpy)'],
  [/^farfield_([ab])\.npy$/, 'application/x-npy', (m) => `Far-field intensity under input ${m[1].toUpperCase()}, float32, zero order at (N/2, N/2) (numpy)`],
  [/^atoms\.csv$/, 'text/csv; charset=utf-8', () => 'Atom library used by this run'],
  [/^design\.json$/, 'application/json', () => 'The design of this run, defaults filled in'],
  [/^metrics\.json$/, 'application/json', () => 'Metrics, convergence and profiles of this run'],
  [/^drc\.json$/, 'application/json', () => 'Design-rule check: rules used, violation counts, first violations'],
  [/^layout\.gds$/, 'application/octet-stream', () => 'GDSII layout of the device'],
  [/^farfield_(a|b|extra)\.png$/, 'image/png', (m) => `Far field under ${inputWords(m[1])}: all the light, both output polarizations together; target windows outlined`],
  [
    /^farfield_(a|b|extra)_out-(a|b)\.png$/,
    'image/png',
    (m) =>
      `Far field under ${inputWords(m[1])}: only the light in channel ${m[2].toUpperCase()}'s output polarization (λ${m[2].toUpperCase()}*, where the device sends input ${m[2].toUpperCase()}), on the same brightness scale as the total`,
  ],
  [/^farfield_(a|b|extra)_([xy])\.png$/, 'image/png', (m) => `Far field under ${inputWords(m[1])}: only the ${m[2]}-polarized light, on the same brightness scale as the total`],
  [/^phase_([ab])\.png$/, 'image/png', (m) => `Channel ${m[1].toUpperCase()} phase map`],
  [/^atom_index\.png$/, 'image/png', () => 'Atom index map'],
  [/^rotation\.png$/, 'image/png', () => 'Rotation map (2θ in cyclic colours)'],
  [/^xz_([ab])\.png$/, 'image/png', (m) => `x–z intensity slice of channel ${m[1].toUpperCase()}`],
  [/^image_plane_([ab])\.png$/, 'image/png', (m) => `Image plane of channel ${m[1].toUpperCase()} (Fresnel hologram)`],
  [/^([a-z0-9_-]+)\.tiles$/, 'application/octet-stream', (m) => `Tile pyramid of ${m[1]}.png: 256-px PNG tiles at every level, for the run page`],
  [
    /^screen_([ab])\.png$/,
    'image/png',
    (m) => `Channel ${m[1].toUpperCase()}'s far field under its own input as irradiance on a flat screen facing the device; the picture's rectangle outlined`,
  ],
];

/** Content type and label of an output file. Example: 'layout.gds' → { mime: 'application/octet-stream', label: 'GDSII layout of the device' }. */
export function describeArtifact(name: string): { mime: string; label: string } {
  for (const [pattern, mime, label] of ARTIFACTS) {
    const match = pattern.exec(name);
    if (match) return { mime, label: label(match) };
  }
  return { mime: 'application/octet-stream', label: name };
}

/**
 * A design field path in words. Example: 'channels.a.terms.0.window' of a hologram →
 * 'channel A, term 1 (image hologram), window'.
 */
export function describeDesignPath(design: Design, path: string): string {
  const match = /^channels\.([ab])(?:\.terms(?:\.(\d+))?)?(?:\.(.+))?$/.exec(path);
  if (!match) return path;
  const [, channel, index, rest] = match;
  const parts = [`channel ${channel.toUpperCase()}`];
  if (index !== undefined) {
    const term = design.channels[channel as 'a' | 'b'].terms[Number(index)];
    parts.push(`term ${Number(index) + 1}${term ? ` (${PHASE_TERM_LABELS[term.kind]})` : ''}`);
  }
  if (rest) parts.push(TERM_PARAMETER_NAMES[rest]?.label ?? rest);
  return parts.join(', ');
}

/**
 * The message stored with a failed run: for problems of the design the engine's own words with the field
 * in words — DesignUnitsError and InputError name the field; a RangeError is the engine refusing a value
 * (e.g. a target picture with no bright pixel in its window). `null` for anything else (the caller logs it
 * and stores a generic message). `replacements` turn working-folder file names back into upload names.
 */
export function designErrorMessage(error: unknown, design: Design, replacements: [string, string][] = []): string | null {
  if (!(error instanceof RangeError) && !(error instanceof InputError)) return null;
  const { message: text } = error as Error;
  let message = error instanceof DesignUnitsError || error instanceof InputError ? text : `the engine cannot use this design: ${text}`;
  for (const [from, to] of replacements) message = message.split(from).join(to);
  const prefix = /^(channels\.[ab][\w.]*|atomLibrary[\w.]*|setup[\w.]*): /.exec(message);
  if (prefix) message = `${describeDesignPath(design, prefix[1])}: ${message.slice(prefix[0].length)}`;
  return message;
}
