import type { ReactNode } from 'react';

const tones = {
  ink: 'bg-ink-mist/70 text-ink',
  ember: 'bg-ember-wash text-ember-deep',
  teal: 'bg-teal-wash text-teal',
  muted: 'bg-paper-deep text-ink-soft',
  danger: 'bg-danger-wash text-danger',
} as const;

export function Badge({ tone = 'ink', children }: { tone?: keyof typeof tones; children: ReactNode }) {
  return (
    <span className={`inline-flex items-center rounded-full px-2.5 py-0.5 text-xs font-bold ${tones[tone]}`}>
      {children}
    </span>
  );
}
