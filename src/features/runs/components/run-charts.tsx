import { Bar, BarChart, CartesianGrid, Legend, Line, LineChart, ReferenceLine, Tooltip, XAxis, YAxis } from 'recharts';
import type { AxialLine, Histogram, RadialProfile } from '@/features/runs/components/run-plots';
import { roundTick } from '@/lib/format';

export const CHANNEL_COLOURS = { a: '#27686a', b: '#b94721' } as const;
const INK = '#2b1740';
const GRID = '#ddd3c1';
const TICK = { fill: '#5e4d6e', fontSize: 12 };
const chartStyle = { width: '100%', height: 300 };
const MAX_POINTS = 600;

function decades(min: number, max: number): { domain: [number, number]; ticks: number[] } {
  const low = Math.floor(Math.log10(min));
  const high = Math.max(low + 1, Math.ceil(Math.log10(max)));
  const ticks: number[] = [];
  for (let e = low; e <= high; e++) {
    ticks.push(10 ** e);
    if (high - low <= 2 && e < high) ticks.push(2 * 10 ** e, 5 * 10 ** e);
  }
  return { domain: [10 ** low, 10 ** high], ticks };
}

const scientific = (value: number) => {
  if (value === 0) return '0';
  const exponent = Math.floor(Math.log10(Math.abs(value)));
  if (exponent >= -2 && exponent <= 2) return String(Number(value.toPrecision(2)));
  const mantissa = Number((value / 10 ** exponent).toPrecision(2));
  return `${mantissa === 1 ? '' : `${mantissa}×`}10${String(exponent).replace('-', '⁻').replace(/\d/g, (d) => '⁰¹²³⁴⁵⁶⁷⁸⁹'[Number(d)])}`;
};

interface ConvergenceChartProps {
  series: { key: 'a' | 'b'; name: string; values: number[] }[];
}

/** Gerchberg–Saxton error against iteration, both channels, log-scale error axis. */
export function ConvergenceChart({ series }: ConvergenceChartProps) {
  const length = Math.max(...series.map((s) => s.values.length));
  const stride = Math.max(1, Math.ceil(length / MAX_POINTS));
  const rows: Record<string, number | null>[] = [];
  let min = Infinity;
  let max = 0;
  for (let i = 0; i < length; i += stride) {
    const at = Math.min(i, length - 1);
    const row: Record<string, number | null> = { iteration: at + 1 };
    for (const s of series) {
      const v = s.values[at];
      const usable = typeof v === 'number' && Number.isFinite(v) && v > 0;
      row[s.key] = usable ? v : null;
      if (usable) {
        min = Math.min(min, v);
        max = Math.max(max, v);
      }
    }
    rows.push(row);
    if (at < length - 1 && i + stride >= length) i = length - 1 - stride;
  }
  if (!(max > 0)) return <p className="text-sm text-ink-soft">No positive error values to plot yet.</p>;
  const { domain, ticks } = decades(min, max);
  return (
    <LineChart data={rows} style={chartStyle} responsive margin={{ top: 8, right: 16, bottom: 20, left: 8 }}>
      <CartesianGrid stroke={GRID} strokeDasharray="3 3" />
      <XAxis
        dataKey="iteration"
        type="number"
        domain={[1, Math.max(2, length)]}
        allowDecimals={false}
        tick={TICK}
        label={{ value: 'iteration', position: 'insideBottom', offset: -12, fill: '#5e4d6e', fontSize: 12 }}
      />
      <YAxis
        scale="log"
        domain={domain}
        ticks={ticks}
        allowDataOverflow
        tickFormatter={scientific}
        tick={TICK}
        width={64}
        label={{ value: 'whole-plane error', angle: -90, position: 'insideLeft', fill: '#5e4d6e', fontSize: 12 }}
      />
      <Tooltip formatter={(value) => (typeof value === 'number' ? value.toExponential(3) : String(value))} labelFormatter={(label) => `Iteration ${label}`} />
      <Legend verticalAlign="top" height={28} />
      {series.map((s) => (
        <Line
          key={s.key}
          dataKey={s.key}
          name={s.name}
          stroke={CHANNEL_COLOURS[s.key]}
          strokeWidth={2}
          dot={false}
          isAnimationActive={false}
          connectNulls
        />
      ))}
    </LineChart>
  );
}

interface ProfileChartProps {
  profile: RadialProfile;
  charge: number | null;
  markers: { radius: number; label: string }[];
  /** Name of the horizontal axis, µm; default the radius. */
  axisLabel?: string;
}

/** Transverse radial profile against radius in µm, with the analytic J_ℓ² curve when given. */
export function ProfileChart({ profile, charge, markers, axisLabel = 'radius r' }: ProfileChartProps) {
  const rows = profile.radius.map((r, i) => ({
    r: r * 1e6,
    measured: profile.measured[i] ?? null,
    analytic: profile.analytic ? (profile.analytic[i] ?? null) : null,
  }));
  const analyticName = charge === null ? 'Analytic J_ℓ²' : `Analytic J${subscript(Math.abs(charge))}²(k sinβ r)`;
  return (
    <LineChart data={rows} style={chartStyle} responsive margin={{ top: 8, right: 16, bottom: 20, left: 8 }}>
      <CartesianGrid stroke={GRID} strokeDasharray="3 3" />
      <XAxis
        dataKey="r"
        type="number"
        domain={[0, 'dataMax']}
        tick={TICK}
        tickFormatter={(v: number) => String(Number(v.toPrecision(3)))}
        label={{ value: `${axisLabel} (µm)`, position: 'insideBottom', offset: -12, fill: '#5e4d6e', fontSize: 12 }}
      />
      <YAxis
        domain={[0, 'auto']}
        tick={TICK}
        width={56}
        tickFormatter={(v: number) => String(Number(v.toPrecision(2)))}
        label={{ value: 'intensity (norm.)', angle: -90, position: 'insideLeft', fill: '#5e4d6e', fontSize: 12 }}
      />
      <Tooltip
        formatter={(value) => (typeof value === 'number' ? value.toFixed(4) : String(value))}
        labelFormatter={(label) => `r = ${Number(label).toPrecision(4)} µm`}
      />
      <Legend verticalAlign="top" height={28} />
      {markers.map((m, i) => (
        <ReferenceLine
          key={m.label}
          x={m.radius * 1e6}
          stroke={INK}
          strokeDasharray="2 4"
          // Lines close together (λf/D beside the simulated zero) keep their labels apart: top, middle, lower.
          label={{ value: m.label, position: (['insideTopRight', 'insideRight', 'insideBottomRight'] as const)[i % 3], fill: INK, fontSize: 11 }}
        />
      ))}
      <Line dataKey="measured" name="Simulated" stroke={CHANNEL_COLOURS.a} strokeWidth={2} dot={false} isAnimationActive={false} connectNulls />
      {profile.analytic ? (
        <Line dataKey="analytic" name={analyticName} stroke={INK} strokeWidth={1.5} strokeDasharray="6 4" dot={false} isAnimationActive={false} connectNulls />
      ) : null}
    </LineChart>
  );
}

function subscript(n: number): string {
  return String(n).replace(/\d/g, (d) => '₀₁₂₃₄₅₆₇₈₉'[Number(d)]);
}

interface AxialChartProps {
  line: AxialLine;
  markers: { z: number; label: string }[];
}

/** Intensity along the beam (on the axis, or on the ring of a vortex beam) against z in µm, the unit the slice planes are entered in. */
export function AxialChart({ line, markers }: AxialChartProps) {
  const rows = line.z.map((z, i) => ({ z: z * 1e6, intensity: line.intensity[i] ?? null }));
  return (
    <LineChart data={rows} style={chartStyle} responsive margin={{ top: 8, right: 16, bottom: 20, left: 8 }}>
      <CartesianGrid stroke={GRID} strokeDasharray="3 3" />
      <XAxis
        dataKey="z"
        type="number"
        domain={['dataMin', 'dataMax']}
        tick={TICK}
        tickFormatter={(v: number) => String(Number(v.toPrecision(3)))}
        label={{ value: 'distance z (µm)', position: 'insideBottom', offset: -12, fill: '#5e4d6e', fontSize: 12 }}
      />
      <YAxis domain={[0, 'auto']} tick={TICK} width={64} tickFormatter={scientific} />
      <Tooltip
        formatter={(value) => (typeof value === 'number' ? value.toExponential(3) : String(value))}
        labelFormatter={(label) => `z = ${Number(label).toPrecision(4)} µm`}
      />
      {markers.map((m, i) => (
        <ReferenceLine
          key={m.label}
          x={m.z * 1e6}
          stroke={INK}
          strokeDasharray="2 4"
          label={{ value: m.label, position: i % 2 === 0 ? 'insideTopLeft' : 'insideBottomRight', fill: INK, fontSize: 11 }}
        />
      ))}
      <Line dataKey="intensity" name={line.meaning ?? 'Intensity'} stroke={CHANNEL_COLOURS.b} strokeWidth={2} dot={false} isAnimationActive={false} connectNulls />
    </LineChart>
  );
}

/** A histogram as bars, e.g. how many cells use each atom. */
export function HistogramChart({ histogram }: { histogram: Histogram }) {
  const rows = histogram.values.map((value, i) => ({ label: histogram.labels[i], value }));
  return (
    <BarChart data={rows} style={chartStyle} responsive margin={{ top: 8, right: 16, bottom: 20, left: 8 }}>
      <CartesianGrid stroke={GRID} strokeDasharray="3 3" vertical={false} />
      <XAxis dataKey="label" tick={TICK} interval="preserveStartEnd" minTickGap={8} tickFormatter={(v) => roundTick(v)} />
      <YAxis tick={TICK} width={64} allowDecimals={false} tickFormatter={(v) => roundTick(v)} />
      <Tooltip />
      <Bar dataKey="value" name="cells" fill={CHANNEL_COLOURS.a} isAnimationActive={false} />
    </BarChart>
  );
}
