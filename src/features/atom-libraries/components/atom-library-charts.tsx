import { Bar, BarChart, CartesianGrid, Cell, Scatter, ScatterChart, Tooltip, XAxis, YAxis } from 'recharts';
import { sequentialColor } from '@shared/optics/colormap';
import type { AtomRow } from '@shared/schemas/atom-libraries';

const GRID = '#ddd3c1';
const TICK = { fill: '#5e4d6e', fontSize: 12 };
const chartStyle = { width: '100%', height: 320 };
const TWO_PI = 2 * Math.PI;
const PI_TICKS = [0, Math.PI / 2, Math.PI, (3 * Math.PI) / 2, TWO_PI];
const SIGNED_PI_TICKS = [-Math.PI, -Math.PI / 2, 0, Math.PI / 2, Math.PI];
const HISTOGRAM_BINS = 24;

/** 0…2π. */
const wrapPositive = (phi: number) => phi - TWO_PI * Math.floor(phi / TWO_PI);
/** (−π, π]. */
const wrapSigned = (phi: number) => {
  const r = wrapPositive(phi);
  return r > Math.PI ? r - TWO_PI : r;
};

function piLabel(value: number): string {
  const q = Math.round((value / Math.PI) * 2);
  const labels: Record<number, string> = { [-2]: '−π', [-1]: '−π/2', 0: '0', 1: 'π/2', 2: 'π', 3: '3π/2', 4: '2π' };
  return labels[q] ?? value.toFixed(2);
}

const rgb = ([r, g, b]: [number, number, number]) => `rgb(${r}, ${g}, ${b})`;

/** Where the atoms sit in the (α_x, α_y) square, each dot coloured by its mean amplitude (t_x + t_y)/2. */
export function PhaseCoverageChart({ atoms }: { atoms: AtomRow[] }) {
  const points = atoms.map((a) => ({ id: a.id, x: wrapPositive(a.alphaX), y: wrapPositive(a.alphaY), t: (a.tx + a.ty) / 2 }));
  return (
    <figure>
      <ScatterChart style={chartStyle} responsive margin={{ top: 8, right: 16, bottom: 24, left: 8 }}>
        <CartesianGrid stroke={GRID} strokeDasharray="3 3" />
        <XAxis type="number" dataKey="x" name="α_x" domain={[0, TWO_PI]} ticks={PI_TICKS} tickFormatter={piLabel} tick={TICK}
          label={{ value: 'α_x (rad)', position: 'insideBottom', offset: -12, fill: '#2b1740' }} />
        <YAxis type="number" dataKey="y" name="α_y" domain={[0, TWO_PI]} ticks={PI_TICKS} tickFormatter={piLabel} tick={TICK}
          label={{ value: 'α_y (rad)', angle: -90, position: 'insideLeft', fill: '#2b1740' }} />
        <Tooltip
          formatter={(value) => (typeof value === 'number' ? value.toFixed(3) : String(value))}
          labelFormatter={() => ''}
        />
        <Scatter data={points} isAnimationActive={false}>
          {points.map((p) => (
            <Cell key={p.id} fill={rgb(sequentialColor(Math.min(1, Math.max(0, p.t))))} stroke="#5e4d6e" strokeWidth={0.75} />
          ))}
        </Scatter>
      </ScatterChart>
      <figcaption className="mt-2 flex flex-wrap items-center gap-2 text-xs text-ink-soft">
        Dot colour: mean amplitude (t_x + t_y)/2 from
        <span className="inline-block h-3 w-24 rounded" style={{ background: `linear-gradient(to right, ${[0, 0.25, 0.5, 0.75, 1].map((t) => rgb(sequentialColor(t))).join(', ')})` }} aria-hidden="true" />
        0 to 1. Gaps in the square are phase pairs no atom reaches.
      </figcaption>
    </figure>
  );
}

/** How many atoms have each retardance α_x − α_y, wrapped to (−π, π]. */
export function RetardanceHistogram({ atoms }: { atoms: AtomRow[] }) {
  const width = TWO_PI / HISTOGRAM_BINS;
  const bins = Array.from({ length: HISTOGRAM_BINS }, (_, i) => ({ centre: -Math.PI + (i + 0.5) * width, count: 0 }));
  for (const a of atoms) {
    const r = wrapSigned(a.alphaX - a.alphaY);
    const index = Math.min(HISTOGRAM_BINS - 1, Math.max(0, Math.floor((r + Math.PI) / width)));
    bins[index].count += 1;
  }
  return (
    <BarChart data={bins} style={chartStyle} responsive margin={{ top: 8, right: 16, bottom: 24, left: 8 }}>
      <CartesianGrid stroke={GRID} strokeDasharray="3 3" vertical={false} />
      <XAxis type="number" dataKey="centre" domain={[-Math.PI, Math.PI]} ticks={SIGNED_PI_TICKS} tickFormatter={piLabel} tick={TICK}
        label={{ value: 'retardance α_x − α_y (rad, wrapped)', position: 'insideBottom', offset: -12, fill: '#2b1740' }} />
      <YAxis allowDecimals={false} tick={TICK} label={{ value: 'atoms', angle: -90, position: 'insideLeft', fill: '#2b1740' }} />
      <Tooltip formatter={(value) => [String(value), 'atoms']} labelFormatter={(value) => `around ${Number(value).toFixed(2)} rad`} />
      <Bar dataKey="count" fill="#27686a" isAnimationActive={false} barSize={14} />
    </BarChart>
  );
}

/** Retardance of one atom, wrapped to (−π, π]. Example: retardance({ alphaX: 0.5, alphaY: 6 }) ≈ 0.783. */
export function retardance(atom: Pick<AtomRow, 'alphaX' | 'alphaY'>): number {
  return wrapSigned(atom.alphaX - atom.alphaY);
}
