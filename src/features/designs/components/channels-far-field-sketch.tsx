import type { FarFieldWindow } from '@shared/schemas/design';
import type { Upload } from '@shared/schemas/uploads';
import { DEMO_IMAGES } from '@/features/designs/utils/demo-images';
import { CHANNEL_NAMES, type ChannelId, type DraftChannel, type HologramDraft } from '@/features/designs/utils/design-draft';
import { placeFarFieldWindow, setupFigures } from '@/features/designs/utils/far-field';

const VIEW = 240;
const DEG = Math.PI / 180;
/** The run's far-field previews outline channel A's window in cyan and B's in magenta (server/cli/previews.ts). */
const COLORS: Record<ChannelId, string> = { a: 'rgb(90 225 255)', b: 'rgb(255 96 208)' };

type Setup = { wavelengthNm: number; periodNm: number; cells: number };

interface Mark {
  channel: ChannelId;
  /** A window in direction cosines (centre, full size), or the point the channel's tilts send the beam to. */
  rect: { u: number; v: number; width: number; height: number } | null;
  point: { u: number; v: number };
  problem: string | null;
  text: string;
}

const fixed = (value: number) => value.toLocaleString(undefined, { maximumFractionDigits: 3, minimumFractionDigits: 3 });

function aspectOf(term: HologramDraft, uploads: readonly Upload[] | undefined): number {
  const ref = term.image;
  if (ref?.source === 'demo') {
    const demo = DEMO_IMAGES.find((entry) => entry.name === ref.name);
    return demo ? demo.width / demo.height : 1;
  }
  const upload = ref?.source === 'upload' ? uploads?.find((entry) => entry.id === ref.id) : undefined;
  return upload ? upload.width / upload.height : 1;
}

/**
 * Where each channel sends its light: the far-field windows of its Fourier holograms, moved by its tilts
 * (a tilt φ = k(x sinθx + y sinθy) shifts the whole far field by (sinθx, sinθy)), or, without a hologram, the
 * direction its tilts point the beam to (the zero order when it has none).
 */
function marksOf(channel: ChannelId, recipe: DraftChannel, setup: Setup, uploads: readonly Upload[] | undefined): Mark[] {
  let tiltU = 0;
  let tiltV = 0;
  for (const term of recipe.terms) {
    if (term.kind !== 'tilt') continue;
    tiltU += Math.sin((term.thetaXDeg ?? 0) * DEG);
    tiltV += Math.sin((term.thetaYDeg ?? 0) * DEG);
  }
  const marks: Mark[] = [];
  for (const term of recipe.terms) {
    if (term.kind !== 'hologram' || !term.window || term.fresnelDistanceUm !== undefined) continue;
    const window = term.window;
    const placed = placeFarFieldWindow(
      { units: window.units ?? 'degrees', width: window.width, height: window.height, centerX: window.centerX ?? 0, centerY: window.centerY ?? 0 } as FarFieldWindow,
      setup,
      aspectOf(term, uploads),
      term.seenOn,
    );
    if ('error' in placed) continue;
    const u = placed.centerU + tiltU;
    const v = placed.centerV + tiltV;
    marks.push({
      channel,
      rect: { u, v, width: placed.width, height: placed.height },
      point: { u, v },
      problem: placed.problem,
      text: `window ${fixed(placed.width)} × ${fixed(placed.height)} centred at u = ${fixed(u)}, v = ${fixed(v)}`,
    });
  }
  if (!marks.length) {
    const text = tiltU || tiltV ? `beam towards u = ${fixed(tiltU)}, v = ${fixed(tiltV)}` : 'beam along the axis (around the zero order)';
    marks.push({ channel, rect: null, point: { u: tiltU, v: tiltV }, problem: null, text });
  }
  return marks;
}

/** Both channels in one far-field sketch (u = sin θx to the right, v = sin θy up), live as the recipe changes. */
export function ChannelsFarFieldSketch({ setup, channels, uploads }: { setup: Setup; channels: Record<ChannelId, DraftChannel>; uploads?: readonly Upload[] }) {
  const figures = setupFigures(setup.wavelengthNm, setup.periodNm, setup.cells);
  if (!figures) return <p className="text-sm text-ink-soft">Give the wavelength, period and cell count to see the far field.</p>;
  const marks = (['a', 'b'] as const).flatMap((c) => marksOf(c, channels[c], setup, uploads));
  const half = figures.gridHalfWidth;
  const extent = Math.max(1, half) * 1.08;
  const scale = VIEW / 2 / extent;
  const x = (u: number) => VIEW / 2 + u * scale;
  const y = (v: number) => VIEW / 2 - v * scale;
  const description = marks.map((mark) => `${CHANNEL_NAMES[mark.channel]}: ${mark.text}${mark.problem ? ' (does not fit)' : ''}`).join('; ');
  return (
    <figure className="flex flex-col gap-1.5">
      <svg viewBox={`0 0 ${VIEW} ${VIEW}`} className="w-full max-w-72 self-center rounded-xl bg-ink-deep" role="img" aria-label={`Far field of both channels. ${description}.`}>
        <rect x={x(-half)} y={y(half)} width={2 * half * scale} height={2 * half * scale} fill="rgb(255 255 255 / 0.04)" stroke="rgb(255 255 255 / 0.35)" strokeDasharray="4 3" />
        <circle cx={x(0)} cy={y(0)} r={scale} fill="rgb(95 179 173 / 0.12)" stroke="var(--color-teal-bright)" strokeWidth="1.5" />
        <line x1={x(-extent)} y1={y(0)} x2={x(extent)} y2={y(0)} stroke="rgb(255 255 255 / 0.15)" />
        <line x1={x(0)} y1={y(-extent)} x2={x(0)} y2={y(extent)} stroke="rgb(255 255 255 / 0.15)" />
        {marks.map((mark, i) => (
          <g key={i} data-sketch-channel={mark.channel}>
            <line x1={x(0)} y1={y(0)} x2={x(mark.point.u)} y2={y(mark.point.v)} stroke={COLORS[mark.channel]} strokeDasharray="2 2" />
            {mark.rect ? (
              <rect
                x={x(mark.rect.u - mark.rect.width / 2)}
                y={y(mark.rect.v + mark.rect.height / 2)}
                width={Math.max(mark.rect.width * scale, 1)}
                height={Math.max(mark.rect.height * scale, 1)}
                fill={mark.problem ? 'rgb(163 42 42 / 0.35)' : 'rgb(255 255 255 / 0.08)'}
                stroke={mark.problem ? '#ff8a8a' : COLORS[mark.channel]}
                strokeWidth="1.5"
              />
            ) : (
              <circle cx={x(mark.point.u)} cy={y(mark.point.v)} r="5" fill="none" stroke={COLORS[mark.channel]} strokeWidth="2" />
            )}
            <text x={x(mark.point.u)} y={y(mark.point.v) - (mark.rect ? (mark.rect.height * scale) / 2 + 4 : 8)} fontSize="11" fontWeight="700" textAnchor="middle" fill={COLORS[mark.channel]}>
              {mark.channel.toUpperCase()}
            </text>
          </g>
        ))}
        <circle cx={x(0)} cy={y(0)} r="3" fill="#fffdf8" />
        <text x={VIEW - 4} y={y(0) + 12} fontSize="9" textAnchor="end" fill="rgb(255 255 255 / 0.6)">u</text>
        <text x={x(0) - 4} y={12} fontSize="9" textAnchor="end" fill="rgb(255 255 255 / 0.6)">v</text>
      </svg>
      <figcaption className="text-xs text-ink-soft">
        <ul className="flex flex-col gap-0.5">
          {marks.map((mark, i) => (
            <li key={i}>
              <span aria-hidden="true" className="mr-1 inline-block size-2.5 rounded-sm align-baseline ring-1 ring-ink/30" style={{ background: COLORS[mark.channel] }} />
              <span className="font-bold text-ink">{mark.channel.toUpperCase()}</span>{' '}
              {mark.text}
              {mark.problem ? <span className="text-danger"> — does not fit</span> : null}
            </li>
          ))}
        </ul>
        <span className="mt-1 block">u = sin θx to the right, v = sin θy up; dashed square ±λ/(2P), circle the propagating limit.</span>
      </figcaption>
    </figure>
  );
}
