import type { AtomLibrarySummary } from '@shared/schemas/atom-libraries';
import { Badge } from '@/components/ui/badge';

export const SCOPE_LABELS: Record<AtomLibrarySummary['scope'], string> = {
  demo: 'Built in',
  personal: 'Personal',
  project: 'This project',
};

/** Scope, and "Shared here" / "Approximate" / "Not usable here" where they apply. */
export function AtomLibraryBadges({ library }: { library: AtomLibrarySummary }) {
  return (
    <span className="inline-flex flex-wrap items-center gap-1.5">
      <Badge tone={library.scope === 'demo' ? 'muted' : library.scope === 'personal' ? 'teal' : 'ink'}>{SCOPE_LABELS[library.scope]}</Badge>
      {library.sharedHere ? <Badge tone="teal">Shared here</Badge> : null}
      {library.approximate ? <Badge tone="ember">Approximate</Badge> : null}
      {library.usable ? null : <Badge tone="danger">Not usable here</Badge>}
    </span>
  );
}
