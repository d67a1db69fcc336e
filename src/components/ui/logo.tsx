import { useId } from 'react';

interface LogoMarkProps {
  size?: number;
  className?: string;
  title?: string;
  tone?: 'ink' | 'paper';
}

/** A pillar seen from above (rounded hexagon) crossed by two orthogonal waves — one per polarization. */
export function LogoMark({ size = 32, className, title, tone = 'ink' }: LogoMarkProps) {
  const titleId = useId();
  const body = tone === 'ink' ? '#2b1740' : '#fffdf8';
  const crossWave = tone === 'ink' ? '#8fd1cb' : '#27686a';
  return (
    <svg
      width={size}
      height={size}
      viewBox="0 0 64 64"
      fill="none"
      className={className}
      role={title ? 'img' : undefined}
      aria-hidden={title ? undefined : true}
      aria-labelledby={title ? titleId : undefined}
    >
      {title ? <title id={titleId}>{title}</title> : null}
      <path d="M32 6 54.5 19v26L32 58 9.5 45V19Z" fill={body} stroke={body} strokeWidth="7" strokeLinejoin="round" />
      <path d="M14 32q4.5-8 9 0t9 0 9 0 9 0" stroke="#e8643c" strokeWidth="4.5" strokeLinecap="round" />
      <path d="M32 14q-8 4.5 0 9t0 9 0 9 0 9" stroke={crossWave} strokeWidth="4.5" strokeLinecap="round" />
    </svg>
  );
}

interface LogoProps {
  size?: number;
  tone?: 'ink' | 'paper';
  className?: string;
}

export function Logo({ size = 32, tone = 'ink', className = '' }: LogoProps) {
  return (
    <span className={`inline-flex items-center gap-2.5 ${className}`}>
      <LogoMark size={size} tone={tone} />
      <span
        className={`font-extrabold tracking-tight ${tone === 'ink' ? 'text-ink' : 'text-card'}`}
        style={{ fontSize: Math.max(16, size * 0.62) }}
      >
        Phasewright
      </span>
    </span>
  );
}
