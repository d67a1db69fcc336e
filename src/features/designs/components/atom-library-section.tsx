import { useDeferredValue, useMemo } from 'react';
import { demoAtomLibrary } from '@shared/optics/demo-library';
import { Badge } from '@/components/ui/badge';
import { Banner } from '@/components/ui/banner';
import { Card } from '@/components/ui/card';
import { useDesignEditor } from '@/features/designs/stores/design-editor-store';

function describeLibrary(wavelengthNm: number, periodNm: number) {
  if (!(wavelengthNm >= 200 && wavelengthNm <= 20000 && periodNm >= 50 && periodNm < wavelengthNm)) return null;
  try {
    const library = demoAtomLibrary({ lambda: wavelengthNm * 1e-9, period: periodNm * 1e-9 });
    return {
      name: library.name,
      material: library.material,
      source: library.source ?? '',
      heightNm: Math.round(library.height * 1e9),
      pillars: library.atoms.filter((atom) => atom.shape !== 'empty').length,
      error: null as string | null,
    };
  } catch (error) {
    return { name: '', material: '', source: '', heightNm: 0, pillars: 0, error: (error as Error).message };
  }
}

export function AtomLibrarySection() {
  const wavelengthNm = useDesignEditor((state) => state.draft?.setup.wavelengthNm ?? 0);
  const periodNm = useDesignEditor((state) => state.draft?.setup.periodNm ?? 0);
  const deferred = useDeferredValue({ wavelengthNm, periodNm });
  const library = useMemo(() => describeLibrary(deferred.wavelengthNm, deferred.periodNm), [deferred.wavelengthNm, deferred.periodNm]);

  return (
    <Card
      title={
        <span className="flex flex-wrap items-center gap-2">
          Atom library <Badge tone="ember">Approximate</Badge>
        </span>
      }
      description="Which meta-atom each cell gets is chosen from this library when the design runs."
      headingLevel="h2"
    >
      <div data-field="atomLibrary" className="flex flex-col gap-3 text-sm">
        <p>
          <strong>Demo library</strong>, generated for this design’s wavelength and period. Its transmissions come from a simple
          waveguide model, not from full-wave simulation: treat the preview efficiencies as approximate, and use your lab’s own
          library before fabrication.
        </p>
        {library === null ? (
          <p className="text-ink-soft">Fix the wavelength and period above to see the library.</p>
        ) : library.error ? (
          <Banner>{library.error}</Banner>
        ) : (
          <dl className="grid gap-x-6 gap-y-2 sm:grid-cols-[auto_minmax(0,1fr)]">
            <dt className="font-bold text-ink-soft">Name</dt>
            <dd>{library.name}</dd>
            <dt className="font-bold text-ink-soft">Pillars</dt>
            <dd>
              {library.pillars} rectangular pillars, {library.heightNm} nm tall, plus an empty cell
            </dd>
            <dt className="font-bold text-ink-soft">Materials</dt>
            <dd>{library.material}</dd>
            <dt className="font-bold text-ink-soft">Model</dt>
            <dd className="text-ink-soft">{library.source}</dd>
          </dl>
        )}
        {library && !library.error && library.pillars === 0 ? (
          <Banner>At this period the demo library holds no pillars; use a larger period.</Banner>
        ) : null}
      </div>
    </Card>
  );
}
