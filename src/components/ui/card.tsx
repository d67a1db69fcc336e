import type { ReactNode } from 'react';

interface CardProps {
  title?: ReactNode;
  description?: ReactNode;
  actions?: ReactNode;
  children?: ReactNode;
  className?: string;
  headingLevel?: 'h2' | 'h3';
}

export function Card({ title, description, actions, children, className = '', headingLevel = 'h2' }: CardProps) {
  const Heading = headingLevel;
  return (
    <section className={`rounded-card bg-card p-6 shadow-card ring-1 ring-line/70 ${className}`}>
      {title || actions ? (
        <div className="mb-4 flex flex-wrap items-start justify-between gap-3">
          <div className="min-w-0">
            {title ? <Heading className="text-lg font-extrabold text-ink">{title}</Heading> : null}
            {description ? <p className="mt-1 text-sm text-ink-soft">{description}</p> : null}
          </div>
          {actions ? <div className="flex shrink-0 flex-wrap items-center gap-2">{actions}</div> : null}
        </div>
      ) : null}
      {children}
    </section>
  );
}
