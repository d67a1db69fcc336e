import { ellipseParameters, innerProduct, type PolarizationPair } from '@shared/optics/polarization';
import type { JonesVector } from '@shared/optics/types';

const SIZE = 112;
const R = 44;

/** Points of the field ellipse traced by Re{E e^{−iωt}} over one period, in drawing coordinates (y up → SVG y down). */
function tracePoints(vector: JonesVector, steps = 96): [number, number][] {
  const [[xr, xi], [yr, yi]] = vector;
  const norm = Math.hypot(xr, xi, yr, yi) || 1;
  const points: [number, number][] = [];
  for (let i = 0; i <= steps; i++) {
    const wt = (2 * Math.PI * i) / steps;
    const ex = (xr * Math.cos(wt) + xi * Math.sin(wt)) / norm;
    const ey = (yr * Math.cos(wt) + yi * Math.sin(wt)) / norm;
    points.push([SIZE / 2 + R * ex, SIZE / 2 - R * ey]);
  }
  return points;
}

function Arrow({ from, to, color }: { from: [number, number]; to: [number, number]; color: string }) {
  const angle = Math.atan2(to[1] - from[1], to[0] - from[0]);
  const tip = to;
  const size = 7;
  const left: [number, number] = [tip[0] - size * Math.cos(angle - 0.45), tip[1] - size * Math.sin(angle - 0.45)];
  const right: [number, number] = [tip[0] - size * Math.cos(angle + 0.45), tip[1] - size * Math.sin(angle + 0.45)];
  return <path d={`M${left[0]},${left[1]} L${tip[0]},${tip[1]} L${right[0]},${right[1]} Z`} fill={color} />;
}

function handednessWords(vector: JonesVector) {
  const ellipse = ellipseParameters(vector);
  const psi = ((ellipse.psi * 180) / Math.PI).toFixed(1);
  const chi = ((ellipse.chi * 180) / Math.PI).toFixed(1);
  if (ellipse.handedness === 'linear') return `linear at ψ = ${psi}°`;
  const circular = Math.abs(Math.abs(ellipse.chi) - Math.PI / 4) < 1e-6;
  return circular
    ? `${ellipse.handedness}-circular`
    : `${ellipse.handedness}-handed elliptical, ψ = ${psi}°, χ = ${chi}°`;
}

function StateDrawing({ vector, name, color }: { vector: JonesVector; name: string; color: string }) {
  const points = tracePoints(vector);
  const ellipse = ellipseParameters(vector);
  const path = points.map(([x, y], i) => `${i === 0 ? 'M' : 'L'}${x.toFixed(2)},${y.toFixed(2)}`).join(' ');
  const words = handednessWords(vector);
  const linear = ellipse.handedness === 'linear';
  return (
    <figure className="flex flex-col items-center gap-1">
      <svg width={SIZE} height={SIZE} viewBox={`0 0 ${SIZE} ${SIZE}`} role="img" aria-label={`State ${name}: ${words}`}>
        <line x1={8} y1={SIZE / 2} x2={SIZE - 8} y2={SIZE / 2} stroke="var(--color-line-strong)" strokeWidth="1" />
        <line x1={SIZE / 2} y1={8} x2={SIZE / 2} y2={SIZE - 8} stroke="var(--color-line-strong)" strokeWidth="1" />
        <text x={SIZE - 10} y={SIZE / 2 - 4} fontSize="9" fill="var(--color-ink-soft)">x</text>
        <text x={SIZE / 2 + 4} y={14} fontSize="9" fill="var(--color-ink-soft)">y</text>
        <path d={path} fill="none" stroke={color} strokeWidth="2.5" strokeLinejoin="round" />
        {linear ? (
          <>
            <Arrow from={[SIZE / 2, SIZE / 2]} to={[SIZE / 2 + R * Math.cos(ellipse.psi), SIZE / 2 - R * Math.sin(ellipse.psi)]} color={color} />
            <Arrow from={[SIZE / 2, SIZE / 2]} to={[SIZE / 2 - R * Math.cos(ellipse.psi), SIZE / 2 + R * Math.sin(ellipse.psi)]} color={color} />
          </>
        ) : (
          <>
            <Arrow from={points[10]} to={points[14]} color={color} />
            <Arrow from={points[58]} to={points[62]} color={color} />
          </>
        )}
      </svg>
      <figcaption className="text-center text-xs">
        <span className="font-extrabold">State {name}</span>
        <span className="block text-ink-soft">{words}</span>
      </figcaption>
    </figure>
  );
}

/** Both states of the pair as the receiver sees them (x right, y up), with the sense of rotation marked. */
export function PolarizationDrawing({ pair }: { pair: PolarizationPair }) {
  const overlap = Math.hypot(...innerProduct(pair.a, pair.b));
  return (
    <div className="flex flex-col items-center gap-2 rounded-xl bg-paper px-4 py-3">
      <div className="flex flex-wrap justify-center gap-6">
        <StateDrawing vector={pair.a} name="A" color="var(--color-ember)" />
        <StateDrawing vector={pair.b} name="B" color="var(--color-teal)" />
      </div>
      <p className="text-center text-xs text-ink-soft">
        |⟨A|B⟩| = {overlap < 1e-12 ? '0' : overlap.toExponential(1)}: {overlap < 1e-9 ? 'orthogonal' : 'not orthogonal'}
      </p>
    </div>
  );
}
