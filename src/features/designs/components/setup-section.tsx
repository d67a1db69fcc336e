import { estimateRunMemory, formatMemory } from '@shared/optics/run-memory';
import { CELL_COUNTS } from '@shared/schemas/design';
import { useMe } from '@/features/auth/api/get-me';
import { Banner } from '@/components/ui/banner';
import { Card } from '@/components/ui/card';
import { DesignNumber, DesignSelect, DesignText } from '@/features/designs/components/design-inputs';
import { useDesignEditor } from '@/features/designs/stores/design-editor-store';
import { useWindowCopyNotes } from '@/features/designs/hooks/use-window-copy-notes';
import { setupFigures } from '@/features/designs/utils/far-field';

const cellOptions = CELL_COUNTS.map((n) => ({ value: String(n), label: `${n} × ${n}` }));
const illuminationOptions = [
  { value: 'plane', label: 'Plane wave (uniform)' },
  { value: 'gaussian', label: 'Gaussian beam' },
] as const;

const lightFromOptions = [
  { value: 'substrate', label: 'Through the substrate' },
  { value: 'superstrate', label: 'Onto the pillars' },
] as const;

const fixed = (value: number, digits: number) => value.toLocaleString(undefined, { maximumFractionDigits: digits, minimumFractionDigits: digits });

function Figure({ term, value, note }: { term: string; value: string; note?: string }) {
  return (
    <div className="rounded-xl bg-paper px-3.5 py-2.5">
      <dt className="text-xs font-bold tracking-wide text-ink-soft uppercase">{term}</dt>
      <dd className="mt-0.5 font-extrabold tabular-nums">{value}</dd>
      {note ? <dd className="text-xs text-ink-soft">{note}</dd> : null}
    </div>
  );
}

/** The run's estimated peak memory (shared/optics/run-memory.ts) against this server's budget for one run. */
function MemoryEstimate() {
  const draft = useDesignEditor((state) => state.draft);
  const budgetMb = useMe().data?.limits?.runMemoryBudgetMb;
  if (!draft) return null;
  const estimate = estimateRunMemory(draft);
  const over = budgetMb !== undefined && estimate.mib > budgetMb;
  return (
    <div className="flex flex-col gap-1.5">
      <span className="text-sm font-bold">Run memory (estimate)</span>
      <output
        aria-live="polite"
        data-testid="memory-estimate"
        className={`flex h-10 items-center rounded-xl px-3.5 font-extrabold tabular-nums ${over ? 'bg-danger-wash text-danger' : 'bg-paper'}`}
      >
        {formatMemory(estimate.bytes)}
      </output>
      <span className="text-xs text-ink-soft">
        {budgetMb === undefined
          ? 'Peak memory of the run, from its cells, propagation and previews.'
          : over
            ? `More than the ${formatMemory(budgetMb * 1024 * 1024)} a run may use on this server: the run would be refused. Choose fewer cells.`
            : `This server allows ${formatMemory(budgetMb * 1024 * 1024)} per run.`}
      </span>
    </div>
  );
}

export function SetupSection() {
  const setup = useDesignEditor((state) => state.draft?.setup);
  const setField = useDesignEditor((state) => state.setField);
  const copyNotes = useWindowCopyNotes();
  if (!setup) return null;
  const figures = setupFigures(setup.wavelengthNm, setup.periodNm, setup.cells);
  const gaussian = setup.illumination?.kind === 'gaussian';

  return (
    <Card title="Setup" description="The light, the lattice and the size of the array." headingLevel="h2">
      <div data-field="setup" className="grid gap-4 sm:grid-cols-2">
        <DesignText path={['name']} label="Design name" maxLength={120} className="sm:col-span-2" />
        <DesignNumber path={['setup', 'wavelengthNm']} label="Wavelength λ" unit="nm" hint="Vacuum wavelength the device is designed for." />
        <DesignNumber path={['setup', 'periodNm']} label="Lattice period P" unit="nm" hint="Centre-to-centre spacing of the pillars." />
        <DesignSelect
          path={['setup', 'cells']}
          label="Array size N × N"
          options={cellOptions}
          onSelect={(value) => setField(['setup', 'cells'], Number(value))}
          hint="Cells per side; larger arrays give finer far-field steps and longer runs."
        />
        <div className="flex flex-col gap-1.5">
          <span className="text-sm font-bold">Aperture D = N·P</span>
          <output aria-live="polite" className="flex h-10 items-center rounded-xl bg-paper px-3.5 font-extrabold tabular-nums">
            {figures ? `${fixed(figures.apertureUm, 1)} µm` : '—'}
          </output>
          <span className="text-xs text-ink-soft">Side length of the square device.</span>
        </div>
        <MemoryEstimate />
        <div aria-hidden="true" className="hidden sm:block" />
        <DesignSelect
          path={['setup', 'illumination', 'kind']}
          label="Illumination"
          options={illuminationOptions}
          onSelect={(value) => setField(['setup', 'illumination'], value === 'gaussian' ? { kind: 'gaussian', waistUm: Math.round((figures?.apertureUm ?? 200) / 3) } : { kind: 'plane' })}
        />
        {gaussian ? (
          <DesignNumber
            path={['setup', 'illumination', 'waistUm']}
            label="Beam waist w"
            unit="µm"
            hint="1/e² intensity radius at the device."
          />
        ) : (
          <div aria-hidden="true" className="hidden sm:block" />
        )}
        <DesignSelect
          path={['setup', 'lightFrom']}
          label="Light enters"
          options={lightFromOptions}
          hint="Through the substrate: it leaves from the pillars’ side. Onto the pillars: it leaves through the substrate, and the layout files, drawn seen from the side the light goes to, are the mask mirrored. Compute the atom library for the same side."
          className="sm:col-span-2"
        />
        <DesignText
          path={['setup', 'platform']}
          label="Platform note"
          maxLength={200}
          hint="Material, pillar height, substrate — for the people who read the design."
          className="sm:col-span-2"
        />
      </div>

      {figures ? (
        <>
          <dl className="mt-5 grid gap-3 sm:grid-cols-3" aria-label="Far-field sampling">
            <Figure term="Far-field step λ/(N·P)" value={`${fixed(figures.deltaU, 5)}`} note={`in sin θ, about ${fixed(figures.deltaDeg, 3)}° near the zero order`} />
            <Figure
              term="Grid reaches λ/(2P)"
              value={`sin θ = ±${fixed(figures.gridHalfWidth, 3)}`}
              note={figures.reachDeg >= 90 ? 'beyond the horizon along x and y' : `±${fixed(figures.reachDeg, 1)}° along x and y`}
            />
            <Figure term="Propagating limit" value="sin²θx + sin²θy ≤ 1" note="Directions outside the unit circle are evanescent." />
          </dl>
          {figures.periodAtLeastHalfWave ? (
            <Banner tone="note" className="mt-4" title="P is at least λ/2 (runs are not blocked)">
              The far-field grid stops at sin θ = ±{fixed(figures.gridHalfWidth, 3)}, short of the horizon, so the steepest propagating
              directions cannot be addressed, and copies of the pattern shifted by λ/P = {fixed(2 * figures.gridHalfWidth, 3)} in sin θ
              fall inside the propagating circle. Choose P below λ/2 = {fixed(setup.wavelengthNm / 2, 1)} nm to avoid both.
              {copyNotes.length ? (
                <ul className="mt-2 list-disc pl-5" data-testid="window-copy-notes">
                  {copyNotes.map((note) => (
                    <li key={note}>{note}</li>
                  ))}
                </ul>
              ) : null}
            </Banner>
          ) : figures.gridHasEvanescent ? (
            <p className="mt-4 text-sm text-ink-soft">
              The corners of the far-field grid lie outside the unit circle: that part is evanescent and is masked in every run.
              Keep targets inside the circle.
            </p>
          ) : null}
        </>
      ) : null}
    </Card>
  );
}
