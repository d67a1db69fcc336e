import type { ReactNode } from 'react';
import { LogoMark } from '@/components/ui/logo';

interface EmptyStateProps {
  title: string;
  children?: ReactNode;
  action?: ReactNode;
}

export function EmptyState({ title, children, action }: EmptyStateProps) {
  return (
    <div className="lattice-ink flex flex-col items-center rounded-card border-2 border-dashed border-line px-6 py-12 text-center">
      <LogoMark size={44} className="opacity-80" />
      <h2 className="mt-4 text-lg font-extrabold">{title}</h2>
      {children ? <div className="mt-1 max-w-md text-sm text-ink-soft">{children}</div> : null}
      {action ? <div className="mt-5">{action}</div> : null}
    </div>
  );
}
