import { Link } from 'react-router-dom';
import { Card } from '@/components/ui/card';
import { paths } from '@/config/paths';
import { DesignNumber, DesignSelect } from '@/features/designs/components/design-inputs';
import { useDesignEditor } from '@/features/designs/stores/design-editor-store';
import { CHI_HINT } from '@/features/designs/utils/design-draft';

const extraKindOptions = [
  { value: 'linear', label: 'Linear' },
  { value: 'circular', label: 'Circular' },
  { value: 'elliptical', label: 'Elliptical' },
] as const;

const handednessOptions = [
  { value: 'left', label: 'Left-circular' },
  { value: 'right', label: 'Right-circular' },
] as const;

const paddingOptions = [
  { value: '2', label: '2× (guards against wrap-around)' },
  { value: '1', label: 'None (faster, may wrap)' },
] as const;

export function AdvancedSection({ projectId }: { projectId: number }) {
  const simulation = useDesignEditor((state) => state.draft?.simulation);
  const setField = useDesignEditor((state) => state.setField);
  const extra = simulation?.extraInput ?? { kind: 'linear' as const, angleDeg: 45 };
  const beamZ = simulation?.beamZUm;

  return (
    <Card title="Preview and fabrication settings" description="How runs simulate the device and write its layout." headingLevel="h2">
      <div className="flex flex-col gap-6">
        <section data-field="simulation" aria-labelledby="sim-heading" className="flex flex-col gap-4">
          <h3 id="sim-heading" className="font-extrabold">
            Third input
          </h3>
          <p className="-mt-2 text-sm text-ink-soft">Besides inputs A and B, every run also previews the device under this third input; linear 45° lights both channels at once.</p>
          <div className="grid gap-4 sm:grid-cols-3">
            <DesignSelect
              path={['simulation', 'extraInput', 'kind']}
              label="Kind"
              options={extraKindOptions}
              onSelect={(kind) =>
                setField(
                  ['simulation', 'extraInput'],
                  kind === 'linear' ? { kind, angleDeg: 45 } : kind === 'circular' ? { kind, handedness: 'left' } : { kind, psiDeg: 0, chiDeg: 20 },
                )
              }
            />
            {extra.kind === 'linear' ? (
              <DesignNumber path={['simulation', 'extraInput', 'angleDeg']} label="Angle ψ" unit="°" />
            ) : extra.kind === 'circular' ? (
              <DesignSelect path={['simulation', 'extraInput', 'handedness']} label="Handedness" options={handednessOptions} />
            ) : (
              <>
                <DesignNumber path={['simulation', 'extraInput', 'psiDeg']} label="Orientation ψ" unit="°" />
                <DesignNumber path={['simulation', 'extraInput', 'chiDeg']} label="Ellipticity χ" unit="°" hint={CHI_HINT} />
              </>
            )}
          </div>
          <DesignSelect
            path={['simulation', 'padding']}
            label="Zero padding for beam propagation"
            options={paddingOptions}
            onSelect={(value) => setField(['simulation', 'padding'], Number(value))}
            className="max-w-sm"
          />
          <fieldset className="flex flex-col gap-3">
            <legend className="mb-1 text-sm font-bold">Planes of the x–z beam slice (µm, as plotted)</legend>
            <label className="flex items-center gap-2 text-sm">
              <input
                type="checkbox"
                className="size-4 accent-[var(--color-teal)]"
                checked={beamZ !== undefined}
                onChange={(event) =>
                  setField(['simulation', 'beamZUm'], event.target.checked ? { start: 0, end: 2000, steps: 64 } : undefined)
                }
              />
              Choose them myself (otherwise they follow the non-diffracting length)
            </label>
            {beamZ !== undefined ? (
              <div className="grid gap-4 sm:grid-cols-3">
                <DesignNumber path={['simulation', 'beamZUm', 'start']} label="From z" unit="µm" />
                <DesignNumber path={['simulation', 'beamZUm', 'end']} label="To z" unit="µm" />
                <DesignNumber path={['simulation', 'beamZUm', 'steps']} label="Planes" hint="2 … 256" />
              </div>
            ) : null}
          </fieldset>
        </section>

        <section data-field="designRules" aria-labelledby="rules-heading" className="flex flex-col gap-2 border-t border-line pt-5">
          <h3 id="rules-heading" className="font-extrabold">
            Design rules
          </h3>
          <p className="text-sm text-ink-soft">
            Runs of this project are checked against the project&apos;s own design rules (smallest gap between
            neighbouring pillars, smallest feature, largest aspect ratio), which the project owner sets on{' '}
            <Link to={paths.projects.detail.getHref(projectId)} className="font-bold text-teal hover:underline">
              the project overview
            </Link>
            . The rules stored in a design file apply when it runs from the command line.
          </p>
        </section>

        <section data-field="layout" aria-labelledby="layout-heading" className="flex flex-col gap-4 border-t border-line pt-5">
          <h3 id="layout-heading" className="font-extrabold">
            Layout
          </h3>
          <div className="grid gap-4 sm:grid-cols-3">
            <DesignNumber path={['layout', 'layer']} label="GDSII layer" placeholder="1" hint="0 … 255" />
            <DesignNumber path={['layout', 'datatype']} label="GDSII datatype" placeholder="0" hint="0 … 255" />
          </div>
        </section>
      </div>
    </Card>
  );
}
