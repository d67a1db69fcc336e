import { CartesianGrid, Legend, Line, LineChart, Tooltip, XAxis, YAxis } from 'recharts';
import { DECIBEL_FLOOR, decibelText } from '@shared/optics/run-metrics';
import type { TolerancePoint } from '@shared/schemas/tolerance';
import { CHANNEL_COLOURS } from '@/features/runs/components/run-charts';
import { roundTick } from '@/lib/format';

const GRID = '#ddd3c1';
const TICK = { fill: '#5e4d6e', fontSize: 12 };
const LABEL = { fill: '#5e4d6e', fontSize: 12 };
const chartStyle = { width: '100%', height: 240 };

export type ToleranceQuantity = 'efficiency' | 'crosstalkDb' | 'zeroOrder';

const AXIS: Record<ToleranceQuantity, { label: string; format: (v: number) => string }> = {
  efficiency: { label: 'efficiency (%)', format: (v) => `${(100 * v).toFixed(2)} %` },
  crosstalkDb: { label: 'crosstalk (dB)', format: (v) => decibelText(v, 2) },
  zeroOrder: { label: 'zero order (%)', format: (v) => `${(100 * v).toFixed(3)} %` },
};

interface ToleranceChartProps {
  points: TolerancePoint[];
  along: 'widthBiasNm' | 'detuneNm';
  quantity: ToleranceQuantity;
  channelNames: { a: string; b: string };
}

/** One figure of both channels against the width bias or the detuning (nm). */
export function ToleranceChart({ points, along, quantity, channelNames }: ToleranceChartProps) {
  const percent = quantity !== 'crosstalkDb';
  const rows = points
    .filter((p) => p.channels)
    .map((p) => {
      const value = (c: 'a' | 'b') => {
        const v = p.channels![c][quantity];
        // Crosstalk below the numerical floor is plotted at the floor (the tooltip says "below").
        return v === null ? null : percent ? 100 * v : Math.max(DECIBEL_FLOOR - 1e-9, v);
      };
      return { x: p[along], a: value('a'), b: value('b') };
    });
  if (rows.length === 0) return <p className="text-sm text-ink-soft">No computed points to plot.</p>;
  return (
    <LineChart data={rows} style={chartStyle} responsive margin={{ top: 8, right: 16, bottom: 22, left: 8 }}>
      <CartesianGrid stroke={GRID} strokeDasharray="3 3" />
      <XAxis
        dataKey="x"
        type="number"
        domain={['dataMin', 'dataMax']}
        tick={TICK}
        tickFormatter={(v) => roundTick(v)}
        label={{ value: along === 'widthBiasNm' ? 'width and length bias Δ (nm)' : 'wavelength detuning δ (nm)', position: 'insideBottom', offset: -14, ...LABEL }}
      />
      <YAxis
        domain={['auto', 'auto']}
        tick={TICK}
        width={60}
        tickFormatter={(v: number) => String(Number(v.toPrecision(3)))}
        label={{ value: AXIS[quantity].label, angle: -90, position: 'insideLeft', ...LABEL }}
      />
      <Tooltip
        formatter={(value) => (typeof value === 'number' ? AXIS[quantity].format(percent ? value / 100 : value) : String(value))}
        labelFormatter={(label) => `${along === 'widthBiasNm' ? 'Δ' : 'δ'} = ${label} nm`}
      />
      <Legend verticalAlign="top" height={28} />
      {(['a', 'b'] as const).map((c) => (
        <Line key={c} dataKey={c} name={channelNames[c]} stroke={CHANNEL_COLOURS[c]} strokeWidth={2} dot isAnimationActive={false} connectNulls />
      ))}
    </LineChart>
  );
}
