import { CartesianGrid, Legend, Line, LineChart, Tooltip, XAxis, YAxis } from 'recharts';
import type { LibraryBuildResult } from '@shared/schemas/library-builds';
import { niceTicks } from '@/components/ui/picture-axes';
import { roundTick } from '@/lib/format';

const GRID = '#ddd3c1';
const TICK = { fill: '#5e4d6e', fontSize: 12 };
const chartStyle = { width: '100%', height: 340 };
const COLOURS = ['#27686a', '#b94721', '#5e4d6e', '#c28a1e', '#2f5d9b', '#8a3f6b'];

type LibraryBuildConvergence = LibraryBuildResult['convergence'][number];
type Key = 'tx' | 'ty' | 'alphaX' | 'alphaY';

/** a − b, phases wrapped to (−π, π]. Example: change('alphaX', 3.1, −3.1) ≈ −0.083. */
function change(key: Key, a: number, b: number): number {
  const d = a - b;
  if (key === 'tx' || key === 'ty') return d;
  const r = d - 2 * Math.PI * Math.floor(d / (2 * Math.PI));
  return r > Math.PI ? r - 2 * Math.PI : r;
}

/**
 * One quantity of the convergence report against the harmonics per axis, a line per reported atom, as the
 * difference from the value at the most harmonics (so every line ends at 0 and the spread shows the error).
 */
function ConvergenceLines({ report, keys, axisLabel }: { report: LibraryBuildConvergence[]; keys: [Key, string][]; axisLabel: string }) {
  const harmonics = [...new Set(report.flatMap((atom) => atom.rows.map((row) => row.harmonics)))].sort((a, b) => a - b);
  const series = report.flatMap((atom) =>
    keys.map(([key, name]) => {
      const last = atom.rows.reduce((best, row) => (row.harmonics > best.harmonics ? row : best), atom.rows[0]);
      return { id: `${atom.atomId}:${key}`, name: `${atom.atomId} ${name}`, values: new Map(atom.rows.map((row) => [row.harmonics, change(key, row[key], last[key])])) };
    }),
  );
  const values = series.flatMap((s) => [...s.values.values()]).filter(Number.isFinite);
  const ticks = niceTicks(Math.min(0, ...values), Math.max(0, ...values), 4);
  const domain: [number, number] = ticks.values.length ? [Math.min(...values, ticks.values[0]), Math.max(...values, ticks.values[ticks.values.length - 1])] : [-1, 1];
  const data = harmonics.map((h) => Object.fromEntries([['harmonics', h], ...series.map((s) => [s.id, s.values.get(h) ?? null])]));
  return (
    <LineChart data={data} style={chartStyle} responsive margin={{ top: 8, right: 16, bottom: 20, left: 8 }}>
      <CartesianGrid stroke={GRID} strokeDasharray="3 3" />
      <XAxis dataKey="harmonics" type="number" domain={['dataMin', 'dataMax']} ticks={harmonics} tick={TICK}
        label={{ value: 'harmonics per axis (N for N × N)', position: 'insideBottom', offset: -12, fill: '#5e4d6e', fontSize: 12 }} />
      <YAxis tick={TICK} width={64} domain={domain} ticks={ticks.values.length ? ticks.values : undefined} tickFormatter={(v) => roundTick(v, 2)}
        label={{ value: axisLabel, angle: -90, position: 'insideLeft', fill: '#5e4d6e', fontSize: 12 }} />
      <Tooltip formatter={(value) => (typeof value === 'number' ? value.toExponential(2) : String(value))} labelFormatter={(h) => `${h} × ${h} harmonics`} />
      <Legend verticalAlign="bottom" wrapperStyle={{ paddingTop: 24, fontSize: 12 }} />
      {series.map((s, i) => (
        <Line key={s.id} dataKey={s.id} name={s.name} stroke={COLOURS[Math.floor(i / keys.length) % COLOURS.length]}
          strokeDasharray={i % keys.length === 0 ? undefined : '5 4'} strokeWidth={2} isAnimationActive={false} connectNulls />
      ))}
    </LineChart>
  );
}

/** The largest change of each quantity between the two highest harmonics of an atom. */
function lastStep(atom: LibraryBuildConvergence): string {
  const rows = [...atom.rows].sort((a, b) => a.harmonics - b.harmonics);
  if (rows.length < 2) return 'one harmonics setting only';
  const [a, b] = rows.slice(-2);
  const d = (key: Key) => Math.abs(change(key, b[key], a[key])).toExponential(1);
  return `${a.harmonics} → ${b.harmonics}: |Δt_x| ${d('tx')}, |Δt_y| ${d('ty')}, |Δα_x| ${d('alphaX')} rad, |Δα_y| ${d('alphaY')} rad`;
}

/** Convergence against harmonics of the report's atoms: amplitudes and phases, each against its last value. */
export function ConvergenceCharts({ report }: { report: LibraryBuildConvergence[] }) {
  if (report.length === 0) return <p className="text-sm text-ink-soft">This build has no convergence report.</p>;
  const summary = report.map((atom) => `${atom.atomId} (w ${atom.widthNm} nm, l ${atom.lengthNm} nm): ${lastStep(atom)}`);
  return (
    <div className="flex flex-col gap-4">
      <div className="grid gap-6 lg:grid-cols-2">
        <div role="img" aria-label={`Amplitude against harmonics. ${summary.join('. ')}.`}>
          <ConvergenceLines report={report} keys={[['tx', 't_x'], ['ty', 't_y']]} axisLabel="change of t" />
        </div>
        <div role="img" aria-label={`Phase against harmonics. ${summary.join('. ')}.`}>
          <ConvergenceLines report={report} keys={[['alphaX', 'α_x'], ['alphaY', 'α_y']]} axisLabel="change of α (rad)" />
        </div>
      </div>
      <ul className="flex flex-col gap-0.5 text-xs text-ink-soft">
        {summary.map((line) => (
          <li key={line}>{line}</li>
        ))}
      </ul>
    </div>
  );
}
