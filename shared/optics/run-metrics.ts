/**
 * The figures of merit of a design run, each carried with its unit and a one-line meaning so that every
 * place showing it (command-line summary, metrics.json, the web preview, the report) says the same thing.
 */

/** One figure of merit. `value` is null when it is undefined for this run (e.g. no minimum found). */
export interface Metric {
  value: number | null;
  /** Unit: 'fraction', 'dB', 'm', 'rad', 'count', or '' for a pure number (shared/display-names.ts formats each). */
  unit: string;
  /** One line: what is measured, on which map, relative to what. */
  meaning: string;
}

/** A named group of metrics. */
export type MetricGroup = Record<string, Metric>;

/**
 * Builds a metric; non-finite values become null (JSON has no NaN or Infinity).
 * Example: metric(0.42, 'fraction', 'power in the window / incident power') → { value: 0.42, … }.
 */
export function metric(value: number, unit: string, meaning: string): Metric {
  return { value: Number.isFinite(value) ? value : null, unit, meaning };
}

/** sinc(x) = sin(πx)/(πx), sinc(0) = 1. Example: sinc(0.5) → 2/π. */
export function sinc(x: number): number {
  if (x === 0) return 1;
  const a = Math.PI * x;
  return Math.sin(a) / a;
}

/**
 * Equivalent number of equal phase levels of a phase error: uniform quantization with L levels has RMS
 * error π/(L·√3) (step 2π/L, noise step²/12), so L = π/(√3·RMS). Example: RMS π/(8√3) → 8.
 */
export function equivalentPhaseLevels(rmsPhaseError: number): number {
  return rmsPhaseError > 0 ? Math.PI / (Math.sqrt(3) * rmsPhaseError) : Infinity;
}

/**
 * First-order efficiency of an L-level blazed phase profile, sinc²(1/L) (Swanson, MIT Lincoln Lab.
 * Tech. Rep. 854 (1989)). Example: L = 8 → 0.9497.
 */
export function blazedEfficiency(levels: number): number {
  return Number.isFinite(levels) ? sinc(1 / levels) ** 2 : 1;
}

/**
 * Ratios of powers below this (dB) are the numerical floor of a float32 simulation, not a measurement:
 * a channel that leaks nothing computes to −300 dB or so, which says no more than "below −100 dB".
 */
export const DECIBEL_FLOOR = -100;

/** A power ratio in dB as shown everywhere. Example: −21.34 → "-21.3 dB"; −328.4 → "below −100 dB". */
export function decibelText(value: number, digits = 1): string {
  if (value < DECIBEL_FLOOR) return `below −${-DECIBEL_FLOOR} dB`;
  return `${value.toFixed(digits)} dB`;
}
