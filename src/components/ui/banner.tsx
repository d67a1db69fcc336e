import type { ReactNode } from 'react';

const tones = {
  error: 'bg-danger-wash text-danger ring-danger/25',
  success: 'bg-success-wash text-success ring-success/25',
  info: 'bg-teal-wash text-teal ring-teal/25',
  warning: 'bg-ember-wash text-ember-deep ring-ember/30',
  /** A caveat that blocks nothing: calm, in the page's own ink. */
  note: 'bg-paper text-ink ring-line-strong',
} as const;

interface BannerProps {
  tone?: keyof typeof tones;
  title?: string;
  children?: ReactNode;
  className?: string;
}

export function Banner({ tone = 'error', title, children, className = '' }: BannerProps) {
  return (
    <div
      role={tone === 'error' ? 'alert' : tone === 'note' ? 'note' : 'status'}
      className={`rounded-2xl px-4 py-3 text-sm ring-1 ring-inset ${tones[tone]} ${className}`}
    >
      {title ? <p className="font-bold">{tone === 'note' ? `Note: ${title}` : title}</p> : null}
      {children ? <div className={title ? 'mt-0.5' : ''}>{children}</div> : null}
    </div>
  );
}

export function FormErrorBanner({ message }: { message: string | null | undefined }) {
  return message ? <Banner tone="error">{message}</Banner> : null;
}
