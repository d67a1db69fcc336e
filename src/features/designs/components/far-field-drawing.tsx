import { FULL_VIEW, PictureAxes } from '@/components/ui/picture-axes';
import type { SetupFigures, WindowPlacement } from '@/features/designs/utils/far-field';

const VIEW = 240;

const fixed = (value: number, digits = 3) => value.toLocaleString(undefined, { maximumFractionDigits: digits, minimumFractionDigits: digits });

/**
 * The far field in direction cosines (u = sin θx to the right, v = sin θy up): the propagating circle
 * u² + v² ≤ 1, the square the N×N grid covers (±λ/2P), the zero order at the centre and the target window.
 */
export function FarFieldDrawing({ figures, placement, label }: { figures: SetupFigures; placement: WindowPlacement; label: string }) {
  const extent = Math.max(1, figures.gridHalfWidth) * 1.08;
  const scale = VIEW / 2 / extent;
  const x = (u: number) => VIEW / 2 + u * scale;
  const y = (v: number) => VIEW / 2 - v * scale;
  const half = figures.gridHalfWidth;
  const rect = {
    x: x(placement.centerU - placement.width / 2),
    y: y(placement.centerV + placement.height / 2),
    width: placement.width * scale,
    height: placement.height * scale,
  };
  const offset = Math.hypot(placement.centerU, placement.centerV);
  const description =
    `${label}: window ${fixed(placement.width)} × ${fixed(placement.height)} in sin θ, centred at u = ${fixed(placement.centerU)}, v = ${fixed(placement.centerV)}, ` +
    `${fixed(offset)} from the zero order. ${placement.problem ? 'It does not fit.' : 'It lies inside the propagating region.'}`;
  const bad = Boolean(placement.problem);
  return (
    <figure className="flex flex-col gap-1.5">
      {/* README "Picture convention": u to the right, v up, seen facing the device from the side the light goes to. */}
      <div className="w-full max-w-[18.75rem]">
        <PictureAxes spec={{ x: { label: 'u = sin θx', unit: '', from: -extent, to: extent }, y: { label: 'v = sin θy', unit: '', from: -extent, to: extent } }} mirrored={false} visible={FULL_VIEW}>
          <svg viewBox={`0 0 ${VIEW} ${VIEW}`} className="w-full rounded-xl bg-ink-deep" role="img" aria-label={description}>
            <rect x={x(-half)} y={y(half)} width={2 * half * scale} height={2 * half * scale} fill="rgb(255 255 255 / 0.04)" stroke="rgb(255 255 255 / 0.35)" strokeDasharray="4 3" />
            <circle cx={x(0)} cy={y(0)} r={scale} fill="rgb(95 179 173 / 0.12)" stroke="var(--color-teal-bright)" strokeWidth="1.5" />
            <line x1={x(-extent)} y1={y(0)} x2={x(extent)} y2={y(0)} stroke="rgb(255 255 255 / 0.15)" />
            <line x1={x(0)} y1={y(-extent)} x2={x(0)} y2={y(extent)} stroke="rgb(255 255 255 / 0.15)" />
            <rect
              x={rect.x}
              y={rect.y}
              width={Math.max(rect.width, 1)}
              height={Math.max(rect.height, 1)}
              fill={bad ? 'rgb(163 42 42 / 0.35)' : 'rgb(232 100 60 / 0.3)'}
              stroke={bad ? '#ff8a8a' : 'var(--color-ember-bright)'}
              strokeWidth="1.5"
            />
            <line x1={x(0)} y1={y(0)} x2={x(placement.centerU)} y2={y(placement.centerV)} stroke="var(--color-ember-bright)" strokeDasharray="2 2" />
            <circle cx={x(0)} cy={y(0)} r="3.5" fill="#fffdf8" />
            <text x={placement.centerU < 0 ? x(0) + 6 : x(0) - 6} y={y(0) + (placement.centerV < 0 ? -8 : 14)} fontSize="10" textAnchor={placement.centerU < 0 ? 'start' : 'end'} fill="#fffdf8">
              zero order
            </text>
            <text x={6} y={VIEW - 6} fontSize="9" fill="var(--color-teal-bright)">circle: sin²θx + sin²θy = 1</text>
            <text x={VIEW - 4} y={y(0) + 12} fontSize="9" textAnchor="end" fill="rgb(255 255 255 / 0.6)">u</text>
            <text x={x(0) - 4} y={12} fontSize="9" textAnchor="end" fill="rgb(255 255 255 / 0.6)">v</text>
          </svg>
        </PictureAxes>
      </div>
      <figcaption className="max-w-60 text-xs text-ink-soft">
        Window {fixed(placement.width)} × {fixed(placement.height)} in sin θ, centre ({fixed(placement.centerU)}, {fixed(placement.centerV)}). u = sin θx, v = sin θy.
        Dashed square: the grid of ±λ/(2P); circle: the propagating limit.
      </figcaption>
    </figure>
  );
}
