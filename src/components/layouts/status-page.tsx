import type { ReactNode } from 'react';
import { LogoMark } from '@/components/ui/logo';

interface StatusPageProps {
  code?: string;
  title: string;
  children?: ReactNode;
  actions?: ReactNode;
  fullScreen?: boolean;
}

export function StatusPage({ code, title, children, actions, fullScreen = false }: StatusPageProps) {
  return (
    <div className={`flex flex-col items-center justify-center px-5 text-center ${fullScreen ? 'lattice-ink min-h-dvh' : 'py-16'}`}>
      <LogoMark size={64} />
      {code ? <p className="mt-6 text-sm font-extrabold tracking-[0.2em] text-ember-deep">{code}</p> : null}
      <h1 className="mt-2 text-3xl font-extrabold tracking-tight">{title}</h1>
      {children ? <div className="mt-3 max-w-md text-ink-soft">{children}</div> : null}
      {actions ? <div className="mt-6 flex flex-wrap justify-center gap-3">{actions}</div> : null}
    </div>
  );
}
