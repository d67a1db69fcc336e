import { INPUT_NAMES } from '@shared/display-names';
import { PHASE_TERM_LABELS, type Design, type PolarizationState } from '@shared/schemas/design';
import type { RunDetail, RunMetric } from '@shared/schemas/runs';
import type { ChannelKey, InputKey } from '@/features/runs/components/artifact-groups';
import type { RunPlots } from '@/features/runs/components/run-plots';

export interface ChannelFacts {
  key: ChannelKey;
  name: string;
  /** Phase terms of the recipe, in words, when the design is known. */
  recipe: string | null;
  beam: boolean;
  lens: boolean;
  charge: number | null;
  metrics: Record<string, RunMetric> | null;
}

function normalize(key: string) {
  return key.toLowerCase().replace(/[\s_-]+/g, ' ').trim();
}

/** The metrics group of channel A or B, whatever the server calls it ("a", "channelA", "channel A — …"). */
export function channelMetrics(metrics: RunDetail['metrics'], channel: ChannelKey): Record<string, RunMetric> | null {
  if (!metrics) return null;
  for (const [key, group] of Object.entries(metrics)) {
    const plain = normalize(key);
    if (plain === channel || new RegExp(`^channel ?${channel}\\b`).test(plain) || plain === `channel${channel}`) return group;
  }
  for (const [key, group] of Object.entries(metrics)) {
    if (/^channels?$/.test(normalize(key)) && group && typeof group === 'object' && channel in group) {
      const nested = (group as Record<string, unknown>)[channel];
      if (nested && typeof nested === 'object') return nested as Record<string, RunMetric>;
    }
  }
  return null;
}

export function channelFacts(run: RunDetail, design: Design | null, channel: ChannelKey, hasSlice: boolean): ChannelFacts {
  const metrics = channelMetrics(run.metrics, channel);
  const recipe = design?.channels[channel];
  const kinds = recipe?.terms.map((t) => t.kind) ?? [];
  const has = (key: string) => Boolean(metrics && key in metrics);
  const beam = kinds.includes('axicon') || has('sinBeta') || has('coreRadiusMeasured') || has('ringRadiusMeasured') || hasSlice;
  const lens = kinds.includes('lens') || has('focalLength');
  const chargeMetric = metrics?.topologicalCharge?.value;
  const chargeFromDesign = recipe?.terms.reduce((sum, t) => sum + (t.kind === 'vortex' ? t.charge : 0), 0);
  return {
    key: channel,
    name: recipe?.label ? `Channel ${channel.toUpperCase()} — ${recipe.label}` : `Channel ${channel.toUpperCase()}`,
    recipe: kinds.length ? kinds.map((k) => PHASE_TERM_LABELS[k]).join(' + ') : null,
    beam,
    lens,
    charge: typeof chargeMetric === 'number' ? chargeMetric : (chargeFromDesign ?? null),
    metrics,
  };
}

const degrees = (value: number) => `${Number(value.toFixed(2))}°`.replace('-', '−');

export function describeState(state: PolarizationState): string {
  switch (state.kind) {
    case 'linear':
      return `linear at ${degrees(state.angleDeg)}`;
    case 'circular':
      return `${state.handedness}-circular`;
    case 'elliptical':
      return `elliptical, ψ = ${degrees(state.psiDeg)}, χ = ${degrees(state.chiDeg)}`;
  }
}

/** The exact orthogonal partner, as the engine builds it: ψ + 90°, −χ. */
function partner(state: PolarizationState): PolarizationState {
  switch (state.kind) {
    case 'linear': {
      const turned = (((state.angleDeg + 90) % 180) + 180) % 180;
      return { kind: 'linear', angleDeg: turned > 90 ? turned - 180 : turned };
    }
    case 'circular':
      return { kind: 'circular', handedness: state.handedness === 'left' ? 'right' : 'left' };
    case 'elliptical':
      return { kind: 'elliptical', psiDeg: state.psiDeg + 90, chiDeg: -state.chiDeg };
  }
}

/** Words for the three preview inputs, with the polarization state when the design is known. */
export function inputNames(design: Design | null): Record<InputKey, { title: string; state: string | null }> {
  return {
    a: { title: INPUT_NAMES.a, state: design ? describeState(design.polarization) : null },
    b: { title: INPUT_NAMES.b, state: design ? describeState(partner(design.polarization)) : null },
    extra: { title: INPUT_NAMES.extra, state: design ? describeState(design.simulation.extraInput) : null },
  };
}

/** True when the run's atoms came from the approximate demo library (design reference or the run's own notes). */
export function usesApproximateLibrary(run: RunDetail, design: Design | null): boolean {
  if (design?.atomLibrary.source === 'demo') return true;
  const plots = run.plots as { library?: { approximate?: unknown }; notes?: unknown } | null;
  if (plots?.library?.approximate === true) return true;
  if (Array.isArray(plots?.notes) && plots.notes.some((note) => typeof note === 'string' && /approximate/i.test(note))) return true;
  if (run.events.some((event) => /approximate/i.test(event.message))) return true;
  const meanings = Object.values(run.metrics ?? {}).flatMap((group) => Object.values(group).map((m) => m.meaning));
  return meanings.some((text) => /approximate/i.test(text));
}

/**
 * How a run's results are laid out per channel: names and facts of A and B, which channels are beams or
 * lenses, and which radial profiles and axial lines belong to which of them (an unlabelled plot belongs to
 * the only beam channel, if there is exactly one). The run page and the shared page both use it.
 */
export function channelLayout(run: RunDetail, design: Design | null, plots: RunPlots, slices: Partial<Record<ChannelKey, unknown>>) {
  const channels = {
    a: channelFacts(run, design, 'a', Boolean(slices.a)),
    b: channelFacts(run, design, 'b', Boolean(slices.b)),
  };
  const channelNames: Record<ChannelKey, string> = { a: channels.a.name, b: channels.b.name };
  const beamChannels = (['a', 'b'] as const).filter((c) => channels[c].beam || channels[c].lens);
  const onlyBeam = beamChannels.length === 1 ? beamChannels[0] : null;
  const belongs = (c: ChannelKey, plotChannel: ChannelKey | null) => plotChannel === c || (plotChannel === null && onlyBeam === c);
  const profilesOf = (c: ChannelKey) => plots.profiles.filter((p) => belongs(c, p.channel));
  const linesOf = (c: ChannelKey) => plots.lines.filter((l) => belongs(c, l.channel));
  const unplacedProfiles = plots.profiles.filter((p) => !beamChannels.some((c) => belongs(c, p.channel)));
  return { channels, channelNames, beamChannels, profilesOf, linesOf, unplacedProfiles };
}

/** The atom library a run used, as its plot data records it (runs since library records were kept), or null. */
export function readRunLibrary(plots: unknown): { name: string; atoms: number; approximate: boolean; source: string | null } | null {
  const library = (plots as { library?: unknown } | null)?.library as Record<string, unknown> | undefined;
  if (!library || typeof library.name !== 'string') return null;
  return {
    name: library.name,
    atoms: typeof library.atoms === 'number' ? library.atoms : 0,
    approximate: library.approximate === true,
    source: typeof library.source === 'string' && library.source ? library.source : null,
  };
}
