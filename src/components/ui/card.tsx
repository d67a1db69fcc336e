import type { ReactNode } from 'react';

interface CardProps {
  title?: ReactNode;
  description?: ReactNode;
  actions?: ReactNode;
  children?: ReactNode;
  className?: string;
  headingLevel?: 'h2' | 'h3';
  /** Literature the card's options and formulas rest on, shown as a footnote below its content. */
  references?: string[];
}

export function Card({ title, description, actions, children, className = '', headingLevel = 'h2', references }: CardProps) {
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
      {references?.length ? (
        <footer className="mt-5 border-t border-line pt-3 text-xs text-ink-soft">
          <p className="font-bold">References</p>
          <ul className="mt-1 flex flex-col gap-0.5">
            {references.map((reference) => (
              <li key={reference}>{reference}</li>
            ))}
          </ul>
        </footer>
      ) : null}
    </section>
  );
}
