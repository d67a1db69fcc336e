import type { ReactNode } from 'react';
import { Link } from 'react-router-dom';
import { LogoMark } from '@/components/ui/logo';
import { paths } from '@/config/paths';

interface AuthLayoutProps {
  title: string;
  intro?: ReactNode;
  children: ReactNode;
  footer?: ReactNode;
}

export function AuthLayout({ title, intro, children, footer }: AuthLayoutProps) {
  return (
    <div className="grid min-h-dvh lg:grid-cols-[minmax(0,1fr)_minmax(0,1.1fr)]">
      <aside className="lattice relative hidden flex-col justify-between overflow-hidden bg-ink p-12 text-card lg:flex">
        <Link to={paths.home.getHref()} className="inline-flex items-center gap-3 self-start rounded-lg">
          <LogoMark size={40} tone="paper" />
          <span className="text-2xl font-extrabold tracking-tight">Phasewright</span>
        </Link>
        <div className="max-w-md">
          <p className="text-3xl leading-tight font-extrabold">
            One flat optic, two wavefronts — <span className="text-ember-bright">one per polarization</span>.
          </p>
          <p className="mt-4 text-ink-mist">
            Set a target for each channel, let the runs pick the pillars, review the simulated preview with your
            team, and take a checked layout to the cleanroom.
          </p>
        </div>
        <svg viewBox="0 0 400 120" className="w-full max-w-md text-ember-bright" aria-hidden="true" fill="none">
          <path d="M0 60q25-44 50 0t50 0 50 0 50 0 50 0 50 0 50 0 50 0" stroke="currentColor" strokeWidth="3" />
          <path
            d="M0 60q25 30 50 0t50 0 50 0 50 0 50 0 50 0 50 0 50 0"
            stroke="#8fd1cb"
            strokeWidth="3"
            strokeDasharray="2 7"
            strokeLinecap="round"
          />
        </svg>
      </aside>
      <main id="main" className="flex flex-col items-center justify-center px-5 py-12">
        <div className="w-full max-w-sm">
          <Link to={paths.home.getHref()} className="mb-8 inline-flex items-center gap-2.5 rounded-lg lg:hidden">
            <LogoMark size={36} />
            <span className="text-xl font-extrabold tracking-tight">Phasewright</span>
          </Link>
          <h1 className="text-3xl font-extrabold tracking-tight">{title}</h1>
          {intro ? <div className="mt-2 text-ink-soft">{intro}</div> : null}
          <div className="mt-8">{children}</div>
          {footer ? <div className="mt-8 border-t border-line pt-5 text-sm text-ink-soft">{footer}</div> : null}
        </div>
      </main>
    </div>
  );
}
