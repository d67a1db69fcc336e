import type { z } from 'zod';
import { PHASE_TERM_LABELS, type AssetRef, type DesignInput, type phaseTermSchema } from '@shared/schemas/design';

type TermInput = z.input<typeof phaseTermSchema>;

/** A recipe term as edited: like the schema's input, except a custom term may still lack its phase map. */
export type DraftTerm = Exclude<TermInput, { kind: 'custom' }> | { kind: 'custom'; phaseMap?: AssetRef };
export type TermKind = DraftTerm['kind'];
export type HologramDraft = Extract<DraftTerm, { kind: 'hologram' }>;
export type AxiconDraft = Extract<DraftTerm, { kind: 'axicon' }>;

export interface DraftChannel {
  label?: string;
  terms: DraftTerm[];
}

export type ChannelId = 'a' | 'b';

/** The design while it is being edited; `designSchema.safeParse` decides whether it may be saved. */
export type DesignDraft = Omit<DesignInput, 'channels'> & { channels: Record<ChannelId, DraftChannel> };

export type FieldPath = readonly (string | number)[];

const sentence = (kind: TermKind) => PHASE_TERM_LABELS[kind].charAt(0).toUpperCase() + PHASE_TERM_LABELS[kind].slice(1);

export const TERM_KINDS: readonly { kind: TermKind; label: string; description: string }[] = [
  { kind: 'hologram', label: sentence('hologram'), description: 'A picture in a far-field window, found by Gerchberg–Saxton' },
  { kind: 'axicon', label: sentence('axicon'), description: 'Conical phase that makes a Bessel beam' },
  { kind: 'vortex', label: sentence('vortex'), description: 'Helical phase of topological charge ℓ' },
  { kind: 'lens', label: sentence('lens'), description: 'Hyperbolic focusing phase' },
  { kind: 'tilt', label: sentence('tilt'), description: 'Linear phase that deflects the beam' },
  { kind: 'custom', label: sentence('custom'), description: 'An uploaded phase map (.npy or grayscale PNG)' },
];

export function termKindLabel(kind: TermKind): string {
  return TERM_KINDS.find((entry) => entry.kind === kind)?.label ?? kind;
}

/**
 * The sign of χ in λ(ψ, χ) = [cosψ cosχ − i sinψ sinχ, sinψ cosχ + i cosψ sinχ] under exp(−iωt): χ > 0 turns
 * counter-clockwise as seen looking towards the source, which Born & Wolf (the convention README cites) call
 * left-handed (from memory, not checked against the book: Born & Wolf's own χ, sin 2χ = sin 2α sin δ, has the
 * opposite sign).
 */
export const CHI_HINT = '−45° … 45°. χ > 0 turns counter-clockwise seen looking towards the source: left-handed in Born & Wolf’s naming (χ = 45° is [1, i]/√2, left-circular).';

export const CHANNEL_NAMES: Record<ChannelId, string> = { a: 'Channel A', b: 'Channel B' };

/** A fresh term of a kind, with values that validate as they are. */
export function newTerm(kind: TermKind, channel: ChannelId): DraftTerm {
  switch (kind) {
    case 'hologram':
      return {
        kind: 'hologram',
        image: { source: 'demo', name: channel === 'a' ? 'lighthouse' : 'compass-rose' },
        window: { units: 'degrees', width: 12, centerX: channel === 'a' ? 15 : -15, centerY: 0 },
        gamma: 1,
        algorithm: 'weighted-gs',
        iterations: 100,
        seed: channel === 'a' ? 1 : 2,
        mixing: 0.5,
      };
    case 'axicon':
      return { kind: 'axicon', numericalAperture: 0.15 };
    case 'vortex':
      return { kind: 'vortex', charge: 1 };
    case 'lens':
      return { kind: 'lens', focalLengthUm: 1000 };
    case 'tilt':
      return { kind: 'tilt', thetaXDeg: 5, thetaYDeg: 0 };
    case 'custom':
      return { kind: 'custom' };
  }
}

/** Where a project without any revision starts: two demo pictures, one per circular state. */
export function designTemplate(projectName: string): DesignDraft {
  return {
    format: 'phasewright-design/1',
    name: projectName.slice(0, 120) || 'First design',
    setup: {
      wavelengthNm: 633,
      periodNm: 450,
      cells: 512,
      illumination: { kind: 'plane' },
      platform: 'Si₃N₄ pillars on fused silica (demo library, approximate)',
    },
    polarization: { kind: 'circular', handedness: 'left' },
    channels: {
      a: { label: 'Lighthouse', terms: [newTerm('hologram', 'a')] },
      b: { label: 'Compass rose', terms: [newTerm('hologram', 'b')] },
    },
    atomLibrary: { source: 'demo' },
    simulation: { extraInput: { kind: 'linear', angleDeg: 45 }, padding: 2 },
    layout: { layer: 1, datatype: 0 },
    designRules: { minGapNm: 50, minFeatureNm: 100, maxAspectRatio: 10 },
  };
}

/** A blank start: the same light and lattice, a linear x/y pair and no terms — nothing from the demos. */
export function blankDesign(projectName: string): DesignDraft {
  const template = designTemplate(projectName);
  return {
    ...template,
    setup: { ...template.setup, platform: '' },
    polarization: { kind: 'linear', angleDeg: 0 },
    channels: { a: { label: '', terms: [] }, b: { label: '', terms: [] } },
  };
}

export function getIn(value: unknown, path: FieldPath): unknown {
  let current = value;
  for (const key of path) {
    if (current === null || typeof current !== 'object') return undefined;
    current = (current as Record<string | number, unknown>)[key];
  }
  return current;
}

/** Immutable set; `undefined` removes the key (optional fields of the schema). */
export function setIn<T>(target: T, path: FieldPath, value: unknown): T {
  if (path.length === 0) return value as T;
  const [key, ...rest] = path;
  const source = (target ?? (typeof key === 'number' ? [] : {})) as Record<string | number, unknown>;
  const copy = (Array.isArray(source) ? [...source] : { ...source }) as Record<string | number, unknown>;
  const next = setIn(source[key], rest, value);
  if (next === undefined && !Array.isArray(copy)) delete copy[key];
  else copy[key] = next;
  return copy as T;
}

export function pathKey(path: FieldPath): string {
  return path.map(String).join('.');
}
