import { draftPolarizationPair } from '@/features/designs/utils/polarization-pair';
import { useMemo } from 'react';
import { Card } from '@/components/ui/card';
import { DesignNumber, DesignSelect } from '@/features/designs/components/design-inputs';
import { PolarizationDrawing } from '@/features/designs/components/polarization-drawing';
import { useDesignEditor } from '@/features/designs/stores/design-editor-store';
import { CHI_HINT } from '@/features/designs/utils/design-draft';


const kindOptions = [
  { value: 'linear', label: 'Linear (A at ψ, B at ψ + 90°)' },
  { value: 'circular', label: 'Circular (both handednesses)' },
  { value: 'elliptical', label: 'Elliptical (ψ, χ and its partner)' },
] as const;

const handednessOptions = [
  { value: 'left', label: 'A left-circular, B right-circular' },
  { value: 'right', label: 'A right-circular, B left-circular' },
] as const;

const HANDEDNESS_CONVENTION =
  'Handedness as seen by the receiver looking towards the source: right-circular turns clockwise, left-circular counter-clockwise (Born & Wolf, with time dependence exp(−iωt)).';

export function PolarizationSection() {
  const polarization = useDesignEditor((state) => state.draft?.polarization);
  const setField = useDesignEditor((state) => state.setField);

  const pair = useMemo(() => draftPolarizationPair(polarization), [polarization]);

  if (!polarization) return null;

  return (
    <Card
      title="Polarization pair"
      description="Channel A answers to state A; channel B to its exact orthogonal partner B."
      headingLevel="h2"
    >
      <div className="grid gap-5 md:grid-cols-[minmax(0,1fr)_auto]">
        <div data-field="polarization" className="flex flex-col gap-4">
          <DesignSelect
            path={['polarization', 'kind']}
            label="Kind of pair"
            options={kindOptions}
            onSelect={(kind) =>
              setField(
                ['polarization'],
                kind === 'linear'
                  ? { kind, angleDeg: 0 }
                  : kind === 'circular'
                    ? { kind, handedness: 'left' }
                    : { kind, psiDeg: 0, chiDeg: 20 },
              )
            }
          />
          {polarization.kind === 'linear' ? (
            <DesignNumber path={['polarization', 'angleDeg']} label="Angle ψ of state A" unit="°" hint="From x towards y; 0° is x-polarized, B is then y." />
          ) : polarization.kind === 'circular' ? (
            <DesignSelect path={['polarization', 'handedness']} label="Handedness" options={handednessOptions} />
          ) : (
            <div className="grid gap-4 sm:grid-cols-2">
              <DesignNumber path={['polarization', 'psiDeg']} label="Orientation ψ" unit="°" hint="Major axis of A, from x towards y." />
              <DesignNumber path={['polarization', 'chiDeg']} label="Ellipticity χ" unit="°" hint={CHI_HINT} />
            </div>
          )}
          <p className="text-xs text-ink-soft">{HANDEDNESS_CONVENTION}</p>
        </div>
        {pair ? <PolarizationDrawing pair={pair} /> : null}
      </div>
    </Card>
  );
}
