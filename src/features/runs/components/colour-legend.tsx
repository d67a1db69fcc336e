import { cyclicColor, sequentialColor, type Rgb } from '@shared/optics/colormap';

const css = ([r, g, b]: Rgb) => `rgb(${r} ${g} ${b})`;

function gradient(color: (t: number) => Rgb, stops = 32): string {
  const parts = Array.from({ length: stops + 1 }, (_, i) => `${css(color(i / stops))} ${((100 * i) / stops).toFixed(2)}%`);
  return `linear-gradient(to right, ${parts.join(', ')})`;
}

const CYCLIC = gradient((t) => cyclicColor(-Math.PI + 2 * Math.PI * t));
const SEQUENTIAL = gradient(sequentialColor);

interface LegendProps {
  title: string;
  ticks: string[];
  note?: string;
}

function Legend({ title, ticks, note, background }: LegendProps & { background: string }) {
  return (
    <figure className="flex flex-col gap-1" aria-label={`${title} colour key`}>
      <figcaption className="text-xs font-bold text-ink-soft">{title}</figcaption>
      <div className="h-3 w-full rounded-full ring-1 ring-line ring-inset" style={{ background }} aria-hidden="true" />
      <div className="flex justify-between text-xs text-ink-soft tabular-nums">
        {ticks.map((tick, i) => (
          <span key={i}>{tick}</span>
        ))}
      </div>
      {note ? <p className="text-xs text-ink-faint">{note}</p> : null}
    </figure>
  );
}

/** Key of the cyclic phase colours (shared/optics/colormap.ts): −π and +π meet in the same colour. */
export function CyclicLegend({ title, ticks = ['−π', '−π/2', '0', 'π/2', 'π'], note }: Partial<LegendProps> & { title: string }) {
  return <Legend title={title} ticks={ticks} note={note ?? 'Cyclic: the two ends are the same colour, so there are no seams at ±π.'} background={CYCLIC} />;
}

/** Key of the sequential colours used for intensities and atom indices. */
export function SequentialLegend({ title, ticks, note }: LegendProps) {
  return <Legend title={title} ticks={ticks} note={note} background={SEQUENTIAL} />;
}
