import { sequentialColor, type Rgb } from '@shared/optics/colormap';
import type { ReactNode } from 'react';

/** One axis of a picture: what it shows, its unit ('' for pure numbers) and its values at the picture's edges. */
export interface AxisSpec {
  label: string;
  unit: string;
  /** Value at the left (x) or bottom (y) edge. */
  from: number;
  /** Value at the right (x) or top (y) edge. */
  to: number;
}

/** What the picture's colours mean, for the key below it. */
export interface ColourKeySpec {
  colours: 'sequential' | 'cyclic' | 'index';
  quantity: string;
  from: string;
  to: string;
}

/** The physical frame of a picture: x to the right and y up (README "Picture convention"), and its colours. */
export interface PictureAxesSpec {
  x: AxisSpec;
  y: AxisSpec;
  key?: ColourKeySpec;
}

/** Which part of the picture is in view, as fractions of its width and height (0…1 at full view). */
export interface VisibleRange {
  left: number;
  right: number;
  top: number;
  bottom: number;
}

/** The whole picture in view. */
export const FULL_VIEW: VisibleRange = { left: 0, right: 1, top: 0, bottom: 1 };

/**
 * About `count` round tick values between a and b (steps 1, 2 or 5 × 10ᵏ), with the decimals their step
 * needs. Example: niceTicks(−1.004, 0.996) → −1, −0.5, 0, 0.5 (step 0.5).
 */
export function niceTicks(a: number, b: number, count = 5): { values: number[]; decimals: number } {
  const lo = Math.min(a, b);
  const hi = Math.max(a, b);
  const span = hi - lo;
  if (!(span > 0) || !Number.isFinite(span)) return { values: [], decimals: 0 };
  const raw = span / count;
  const power = 10 ** Math.floor(Math.log10(raw));
  const step = [1, 2, 5, 10].map((m) => m * power).find((s) => s >= raw) ?? 10 * power;
  const decimals = Math.max(0, -Math.floor(Math.log10(step) + 1e-9));
  const values: number[] = [];
  for (let k = Math.ceil(lo / step - 1e-9); k * step <= hi + step * 1e-9; k++) values.push(Number((k * step).toFixed(decimals)));
  return { values, decimals };
}

function formatTick(value: number, decimals: number): string {
  const text = (Object.is(value, -0) ? 0 : value).toFixed(decimals);
  return text.startsWith('-') ? `−${text.slice(1)}` : text;
}

const axisName = (axis: AxisSpec) => (axis.unit ? `${axis.label} (${axis.unit})` : axis.label);

/** The symbol an orientation mark names an axis by: "u" of "u = sin θx", "X / L" of "X / L = tan θx". */
const shortName = (axis: AxisSpec) => axis.label.split('=')[0].trim();

interface PictureAxesProps {
  spec: PictureAxesSpec;
  /** Shown mirrored left to right (display only): the x axis runs the other way. */
  mirrored: boolean;
  visible: VisibleRange;
  /** The picture's frame, drawn between the axes. */
  children: ReactNode;
}

/**
 * Labelled axes around a picture that follow its zoom: y ticks on the left (up = larger y), x ticks below,
 * axis names with units, a small orientation mark, and the colour key when the picture has one.
 */
export function PictureAxes({ spec, mirrored, visible, children }: PictureAxesProps) {
  const { x, y } = spec;
  // Value at a picture fraction: x from the left edge, y from the top edge (the top is `y.to`).
  const xAt = (f: number) => x.from + (mirrored ? 1 - f : f) * (x.to - x.from);
  const yAt = (f: number) => y.to - f * (y.to - y.from);
  const xTicks = niceTicks(xAt(visible.left), xAt(visible.right));
  const yTicks = niceTicks(yAt(visible.bottom), yAt(visible.top));
  // Frame position 0…1 of a value.
  const xPlace = (value: number) => {
    const f = (value - x.from) / (x.to - x.from);
    return ((mirrored ? 1 - f : f) - visible.left) / (visible.right - visible.left);
  };
  const yPlace = (value: number) => ((y.to - value) / (y.to - y.from) - visible.top) / (visible.bottom - visible.top);
  const inside = (p: number) => p >= -1e-6 && p <= 1 + 1e-6;

  return (
    <div className="flex flex-col gap-1" data-picture-axes="">
      <div className="grid grid-cols-[auto_minmax(0,1fr)] gap-x-1">
        <div className="relative flex w-14 items-stretch" aria-hidden="true">
          <span className="absolute top-1/2 left-0 -translate-x-[calc(50%-0.5rem)] -translate-y-1/2 -rotate-90 text-xs font-bold whitespace-nowrap text-ink-soft">
            {axisName(y)}
          </span>
          <div className="relative ml-5 flex-1">
            {yTicks.values.map((value) => {
              const p = yPlace(value);
              return inside(p) ? (
                <span key={value} className="absolute right-0 flex -translate-y-1/2 items-center gap-0.5 text-[0.7rem] text-ink-soft tabular-nums" style={{ top: `${p * 100}%` }}>
                  {formatTick(value, yTicks.decimals)}
                  <span className="inline-block h-px w-1.5 bg-ink-soft" />
                </span>
              ) : null;
            })}
          </div>
        </div>
        {children}
        <div className="flex items-start justify-center pt-1">
          <OrientationMark x={shortName(x)} y={shortName(y)} mirrored={mirrored} />
        </div>
        <div aria-hidden="true">
          <div className="relative h-5">
            {xTicks.values.map((value) => {
              const p = xPlace(value);
              return inside(p) ? (
                <span key={value} className="absolute top-0 flex -translate-x-1/2 flex-col items-center text-[0.7rem] text-ink-soft tabular-nums" style={{ left: `${p * 100}%` }}>
                  <span className="inline-block h-1.5 w-px bg-ink-soft" />
                  {formatTick(value, xTicks.decimals)}
                </span>
              ) : null;
            })}
          </div>
          <p className="text-center text-xs font-bold text-ink-soft">
            {axisName(x)}
            {mirrored ? ' — mirrored: increasing to the left' : ''}
          </p>
        </div>
      </div>
      <p className="sr-only">
        Axes: {axisName(x)} from {formatTick(x.from, 3)} to {formatTick(x.to, 3)}, {mirrored ? 'increasing to the left (mirrored view)' : 'increasing to the right'};{' '}
        {axisName(y)} from {formatTick(y.from, 3)} to {formatTick(y.to, 3)}, increasing upwards.
      </p>
      {spec.key?.colours === 'sequential' ? <ColourKey spec={spec.key} /> : null}
    </div>
  );
}

/** Two arrows naming the directions of growing x and y, as the picture shows them. */
function OrientationMark({ x, y, mirrored }: { x: string; y: string; mirrored: boolean }) {
  const ax = mirrored ? 34 : 8;
  const bx = mirrored ? 8 : 34;
  return (
    <svg viewBox="0 0 44 40" className="h-12 w-13 text-ink-soft" role="img" aria-label={`${x} grows ${mirrored ? 'to the left' : 'to the right'}, ${y} grows upwards`}>
      <g stroke="currentColor" strokeWidth="1.6" fill="none" strokeLinecap="round">
        <path d={`M${ax} 30 H${bx}`} />
        <path d={mirrored ? `M${bx + 4} 26 L${bx} 30 L${bx + 4} 34` : `M${bx - 4} 26 L${bx} 30 L${bx - 4} 34`} />
        <path d={`M${ax} 30 V6`} />
        <path d={`M${ax - 4} 10 L${ax} 6 L${ax + 4} 10`} />
      </g>
      <text x={mirrored ? bx - 2 : bx + 2} y="33" fontSize="10" fill="currentColor" textAnchor={mirrored ? 'end' : 'start'}>
        {x}
      </text>
      <text x={mirrored ? ax - 6 : ax + 6} y="9" fontSize="10" fill="currentColor" textAnchor={mirrored ? 'end' : 'start'}>
        {y}
      </text>
    </svg>
  );
}

const css = ([r, g, b]: Rgb) => `rgb(${r} ${g} ${b})`;
function gradient(color: (t: number) => Rgb, stops = 24): string {
  return `linear-gradient(to right, ${Array.from({ length: stops + 1 }, (_, i) => `${css(color(i / stops))} ${((100 * i) / stops).toFixed(1)}%`).join(', ')})`;
}

/** The brightness key of an intensity picture: its colour ramp with the values at both ends and what they measure. */
function ColourKey({ spec }: { spec: ColourKeySpec }) {
  const background = gradient(sequentialColor);
  return (
    <div className="ml-15 flex flex-col gap-0.5">
      <div className="flex items-center gap-2 text-[0.7rem] text-ink-soft tabular-nums">
        <span>{spec.from}</span>
        <div className="h-2.5 max-w-48 flex-1 rounded-full ring-1 ring-line ring-inset" style={{ background }} aria-hidden="true" />
        <span>{spec.to}</span>
      </div>
      <p className="text-[0.7rem] text-ink-soft">Brightness: {spec.quantity}</p>
    </div>
  );
}
