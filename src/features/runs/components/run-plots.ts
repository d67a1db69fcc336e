import type { ChannelKey } from '@/features/runs/components/artifact-groups';
import { roundTick } from '@/lib/format';

/** A transverse radial profile: measured intensity and, for Bessel beams, the analytic J_ℓ² curve. */
export interface RadialProfile {
  channel: ChannelKey | null;
  source: string;
  /** Metres. */
  radius: number[];
  measured: (number | null)[];
  analytic: (number | null)[] | null;
  /** Distance of the plane, metres, when known. */
  z: number | null;
}

/** Intensity along z on the axis (or the ring of a vortex beam). */
export interface AxialLine {
  channel: ChannelKey | null;
  source: string;
  /** Metres. */
  z: number[];
  intensity: (number | null)[];
  meaning: string | null;
}

export interface Histogram {
  source: string;
  values: number[];
  labels: string[];
}

export interface RunPlots {
  profiles: RadialProfile[];
  lines: AxialLine[];
  histograms: Histogram[];
}

type Json = Record<string, unknown>;

const isObject = (value: unknown): value is Json => typeof value === 'object' && value !== null && !Array.isArray(value);
const isNumberArray = (value: unknown): value is (number | null)[] =>
  Array.isArray(value) && value.length > 0 && value.every((v) => v === null || typeof v === 'number');

function findKey(node: Json, pattern: RegExp): string | undefined {
  return Object.keys(node).find((key) => pattern.test(key) && isNumberArray(node[key]));
}

function channelOf(path: string[]): ChannelKey | null {
  for (let i = path.length - 1; i >= 0; i--) {
    const match = /^(?:channel[ _-]?)?([ab])$/i.exec(path[i]) ?? /[_-]([ab])$/i.exec(path[i]);
    if (match) return match[1].toLowerCase() as ChannelKey;
  }
  return null;
}

function histogramOf(value: unknown, source: string): Histogram | null {
  if (isNumberArray(value)) {
    const values = value.map((v) => v ?? 0);
    return { source, values, labels: values.map((_, i) => String(i)) };
  }
  if (!isObject(value)) return null;
  const countsKey = findKey(value, /^(counts?|values?|cells|frequency)$/i);
  if (!countsKey) return null;
  const values = (value[countsKey] as (number | null)[]).map((v) => v ?? 0);
  const labelKey = Object.keys(value).find((key) => /^(labels?|names?|atoms?|bins?|edges?)$/i.test(key) && Array.isArray(value[key]));
  const given = labelKey ? (value[labelKey] as unknown[]) : [];
  const labels = values.map((_, i) => (given[i] !== undefined && given[i] !== null ? roundTick(given[i]) : String(i)));
  return { source, values, labels };
}

/**
 * Reads the plot data of a run without assuming its exact layout: any object with a radius array and a
 * measured array is a radial profile, any object with z and an intensity array is an axial line, any key
 * naming a histogram is a histogram. The channel comes from the path ("a", "b", "channel A", "…_b").
 */
export function readRunPlots(plots: Record<string, unknown> | null): RunPlots {
  const found: RunPlots = { profiles: [], lines: [], histograms: [] };
  const visit = (node: unknown, path: string[], depth: number) => {
    if (!isObject(node) || depth > 6) return;
    const source = path.join(' › ');
    const radiusKey = findKey(node, /^r(adius)?(_?m)?$/i) ?? findKey(node, /radius/i);
    const measuredKey = findKey(node, /measured|intensity|simulated/i);
    if (radiusKey && measuredKey && node[radiusKey] !== node[measuredKey]) {
      const analyticKey = findKey(node, /analytic|bessel|formula|theory|expected/i);
      const zValue = Object.entries(node).find(([key, v]) => /^z(_?m)?$/i.test(key) && typeof v === 'number');
      found.profiles.push({
        channel: channelOf(path),
        source,
        radius: (node[radiusKey] as (number | null)[]).map((v) => v ?? NaN),
        measured: node[measuredKey] as (number | null)[],
        analytic: analyticKey ? (node[analyticKey] as (number | null)[]) : null,
        z: zValue ? (zValue[1] as number) : null,
      });
    } else {
      const zKey = findKey(node, /^z(_?m)?$/i);
      const lineKey = findKey(node, /line|axis|axial/i);
      if (zKey && lineKey) {
        const meaningEntry = Object.entries(node).find(([key, v]) => /meaning/i.test(key) && typeof v === 'string');
        found.lines.push({
          channel: channelOf(path),
          source,
          z: (node[zKey] as (number | null)[]).map((v) => v ?? NaN),
          intensity: node[lineKey] as (number | null)[],
          meaning: meaningEntry ? (meaningEntry[1] as string) : null,
        });
      }
    }
    for (const [key, child] of Object.entries(node)) {
      if (/histogram/i.test(key)) {
        const histogram = histogramOf(child, [...path, key].join(' › '));
        if (histogram) {
          found.histograms.push(histogram);
          continue;
        }
      }
      if (isObject(child)) visit(child, [...path, key], depth + 1);
    }
  };
  visit(plots, [], 0);
  return found;
}

export interface DesignRuleFinding {
  kind: string;
  ix: number;
  iy: number;
  neighbour: { ix: number; iy: number } | null;
  value: number;
  limit: number;
  atomId: string;
}

/** Design-rule findings listed with the run (first few, row-major), and whether the list was cut short. */
export function readDesignRules(plots: Record<string, unknown> | null): { findings: DesignRuleFinding[]; truncated: boolean } | null {
  const rules = plots?.designRules;
  if (!isObject(rules) || !Array.isArray(rules.violations)) return null;
  const findings = rules.violations.filter(
    (v): v is DesignRuleFinding => isObject(v) && typeof v.kind === 'string' && typeof v.ix === 'number' && typeof v.iy === 'number',
  );
  return { findings, truncated: rules.truncated === true };
}

/** Plain notes stored with the run (conventions, cautions), as given. */
export function readNotes(plots: Record<string, unknown> | null): string[] {
  const notes = plots?.notes;
  return Array.isArray(notes) ? notes.filter((n): n is string => typeof n === 'string') : [];
}
