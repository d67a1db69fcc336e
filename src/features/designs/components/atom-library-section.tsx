import { useDeferredValue, useMemo } from 'react';
import type { LightSide } from '@shared/optics/atoms';
import { demoAtomLibrary } from '@shared/optics/demo-library';
import { designCellNotes } from '@shared/optics/library-builder';
import { libraryMismatches, type AtomLibrarySummary } from '@shared/schemas/atom-libraries';
import { Badge } from '@/components/ui/badge';
import { Banner } from '@/components/ui/banner';
import { Card } from '@/components/ui/card';
import { SelectField } from '@/components/ui/field';
import { useDesignAtomLibraries } from '@/features/designs/api/get-atom-libraries';
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

interface DesignCell {
  wavelengthNm: number;
  periodNm: number;
  lightFrom: LightSide;
}

/** The light side against the library's and the lattice's own diffraction, with the numbers; non-blocking. */
function CellNotes({ cell, library, demo = false }: { cell: DesignCell; library: { source?: string | null }; demo?: boolean }) {
  if (!(cell.wavelengthNm > 0 && cell.periodNm > 0)) return null;
  const notes = designCellNotes(cell, library);
  return (
    <>
      {notes.sideMismatch ? (
        <Banner tone="warning" title="The library was computed for light from the other side">
          <p>{notes.sideMismatch[0].toUpperCase() + notes.sideMismatch.slice(1)}.</p>
        </Banner>
      ) : null}
      {notes.diffraction.length > 0 ? (
        <Banner tone="note" title="The lattice itself diffracts (runs are not blocked)">
          <ul className="list-disc pl-5" data-testid="lattice-diffraction-notes">
            {notes.diffraction.map((d) => (
              <li key={d.medium}>{d.message[0].toUpperCase() + d.message.slice(1)}.</li>
            ))}
          </ul>
          <p className="mt-1">
            Choose P below {Math.min(...notes.diffraction.map((d) => d.limit * 1e9)).toFixed(1)} nm to avoid it.{' '}
            {demo
              ? 'The demo library’s waveguide model does not see this loss: full-wave (RCWA) results transmit less of the zeroth order (README, “Demo library against RCWA”).'
              : 'A library computed here by RCWA keeps the zeroth order only, so its transmissions already count the light that goes elsewhere.'}
          </p>
        </Banner>
      ) : null}
      {notes.mediaUnknown ? (
        <p className="text-ink-soft">
          This library does not record its substrate and superstrate indices, so the lattice’s own diffraction is not checked here. Its
          source line gives them in the words the RCWA builder uses: “light from the substrate side (substrate n = 1.4570, superstrate n =
          1.0000)”.
        </p>
      ) : null}
    </>
  );
}

function DemoLibraryFacts({ wavelengthNm, periodNm, lightFrom }: DesignCell) {
  const deferred = useDeferredValue({ wavelengthNm, periodNm });
  const library = useMemo(() => describeLibrary(deferred.wavelengthNm, deferred.periodNm), [deferred.wavelengthNm, deferred.periodNm]);
  return (
    <>
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
      {library && !library.error ? <CellNotes cell={{ wavelengthNm: deferred.wavelengthNm, periodNm: deferred.periodNm, lightFrom }} library={library} demo /> : null}
    </>
  );
}

function StoredLibraryFacts({ library, wavelengthNm, periodNm, lightFrom }: DesignCell & { library: AtomLibrarySummary }) {
  const mismatches = libraryMismatches({ wavelengthNm, periodNm }, library);
  return (
    <>
      <dl className="grid gap-x-6 gap-y-2 sm:grid-cols-[auto_minmax(0,1fr)]">
        <dt className="font-bold text-ink-soft">Made for</dt>
        <dd>
          λ = {library.wavelengthNm} nm, P = {library.periodNm} nm, pillars {library.heightNm} nm tall
        </dd>
        <dt className="font-bold text-ink-soft">Atoms</dt>
        <dd>{library.atomCount}</dd>
        <dt className="font-bold text-ink-soft">Material</dt>
        <dd>{library.material || '—'}</dd>
      </dl>
      {library.approximate ? (
        <p className="text-ink-soft">This library is marked approximate: treat the preview efficiencies as approximate.</p>
      ) : null}
      {mismatches.length > 0 ? (
        <Banner tone="error" title="This library does not fit the design">
          <p>{mismatches.join('; ')}. Saving is refused until the wavelength and period match the library’s (within 0.1 %).</p>
        </Banner>
      ) : (
        <CellNotes cell={{ wavelengthNm, periodNm, lightFrom }} library={library} />
      )}
    </>
  );
}

export function AtomLibrarySection({ projectId }: { projectId: number }) {
  const wavelengthNm = useDesignEditor((state) => state.draft?.setup.wavelengthNm ?? 0);
  const periodNm = useDesignEditor((state) => state.draft?.setup.periodNm ?? 0);
  const lightFrom = useDesignEditor((state) => state.draft?.setup.lightFrom ?? 'substrate');
  const ref = useDesignEditor((state) => state.draft?.atomLibrary);
  const setField = useDesignEditor((state) => state.setField);
  const libraries = useDesignAtomLibraries(projectId);

  const selectedId = ref?.source === 'library' ? ref.id : null;
  const choices = (libraries.data ?? []).filter((l) => l.id === 'demo' || l.usable || l.id === selectedId);
  const selected = selectedId === null ? null : (libraries.data?.find((l) => l.id === selectedId) ?? null);
  const options = choices.map((l) => ({
    value: String(l.id),
    label: l.id === 'demo' ? 'Demo library (approximate)' : `${l.name} — λ ${l.wavelengthNm} nm, P ${l.periodNm} nm${l.approximate ? ' (approximate)' : ''}`,
  }));
  if (selectedId !== null && !selected) options.push({ value: String(selectedId), label: `Library ${selectedId}` });
  const approximate = selectedId === null || selected?.approximate !== false;

  return (
    <Card
      title={
        <span className="flex flex-wrap items-center gap-2">
          Atom library {approximate ? <Badge tone="ember">Approximate</Badge> : null}
        </span>
      }
      description="Which meta-atom each cell gets is chosen from this library when the design runs."
      headingLevel="h2"
    >
      <div data-field="atomLibrary" className="flex flex-col gap-3 text-sm">
        <SelectField
          label="Library to map atoms from"
          value={selectedId === null ? 'demo' : String(selectedId)}
          onValueChange={(value) => setField(['atomLibrary'], value === 'demo' ? { source: 'demo' } : { source: 'library', id: Number(value) })}
          options={options.length ? options : [{ value: 'demo', label: 'Demo library (approximate)' }]}
          hint={libraries.isError ? `The uploaded libraries did not load: ${libraries.error.message}` : 'Upload your own on the Atom libraries tab.'}
        />
        {selectedId === null ? (
          <DemoLibraryFacts wavelengthNm={wavelengthNm} periodNm={periodNm} lightFrom={lightFrom} />
        ) : selected ? (
          <StoredLibraryFacts library={selected} wavelengthNm={wavelengthNm} periodNm={periodNm} lightFrom={lightFrom} />
        ) : libraries.isPending ? (
          <p className="text-ink-soft">Loading the library’s facts…</p>
        ) : (
          <Banner>Library {selectedId} is not visible in this project; pick another one.</Banner>
        )}
      </div>
    </Card>
  );
}
