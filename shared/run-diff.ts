/**
 * How the metrics of two runs differ: one row per metric that either run has, in run a's order (sections,
 * then keys) followed by those only run b has. Δ = b − a in the metric's unit; % = 100·Δ/|a|. Pure, no I/O.
 */
import type { RunMetric } from './schemas/runs';
import type { MetricChange } from './schemas/run-comparison';

type Metrics = Record<string, Record<string, RunMetric>> | null;

const finite = (v: number | null | undefined): number | null => (typeof v === 'number' && Number.isFinite(v) ? v : null);

/**
 * Example: a = { 'channel A': { efficiency: 0.5 } }, b = { 'channel A': { efficiency: 0.6 } } →
 * [{ section: 'channel A', key: 'efficiency', a: 0.5, b: 0.6, delta: 0.1 (to rounding), percent: 20 }].
 */
export function diffMetrics(a: Metrics, b: Metrics): MetricChange[] {
  const rows: MetricChange[] = [];
  const seen = new Set<string>();
  const add = (section: string, key: string) => {
    const id = `${section}\u0000${key}`;
    if (seen.has(id)) return;
    seen.add(id);
    const left = a?.[section]?.[key];
    const right = b?.[section]?.[key];
    const va = finite(left?.value);
    const vb = finite(right?.value);
    const delta = va !== null && vb !== null ? vb - va : null;
    rows.push({
      section,
      key,
      unit: (left ?? right)!.unit,
      meaning: (left ?? right)!.meaning,
      a: va,
      b: vb,
      delta,
      percent: delta !== null && va !== 0 ? (100 * delta) / Math.abs(va!) : null,
    });
  };
  for (const side of [a, b]) {
    for (const [section, group] of Object.entries(side ?? {})) for (const key of Object.keys(group ?? {})) add(section, key);
  }
  return rows;
}
