import { useId } from 'react';
import { MathText } from '@/components/ui/math-text';
import { AssetPicker } from '@/features/designs/components/asset-picker';
import { DesignNumber, GroupError } from '@/features/designs/components/design-inputs';
import { HologramTermFields } from '@/features/designs/components/hologram-term-fields';
import { useDesignField } from '@/features/designs/hooks/use-design-field';
import { useDesignEditor } from '@/features/designs/stores/design-editor-store';
import type { AxiconDraft, DraftTerm, FieldPath } from '@/features/designs/utils/design-draft';
import { friendlyMessage } from '@/features/designs/utils/friendly-message';

function AxiconFields({ path, term }: { path: FieldPath; term: AxiconDraft }) {
  const setField = useDesignEditor((state) => state.setField);
  const byAngle = term.coneHalfAngleDeg !== undefined && term.numericalAperture === undefined;
  const wavelengthNm = useDesignEditor((state) => state.draft?.setup.wavelengthNm);
  const group = useId();
  const sinBeta = byAngle ? Math.sin(((term.coneHalfAngleDeg ?? 0) * Math.PI) / 180) : term.numericalAperture;
  const coreRadiusUm =
    wavelengthNm && sinBeta && sinBeta > 0 && sinBeta < 1 ? (2.404826 * wavelengthNm * 1e-3) / (2 * Math.PI * sinBeta) : null;

  function switchTo(mode: 'angle' | 'na') {
    if (mode === 'angle' && !byAngle) {
      const na = term.numericalAperture;
      const angle = na && na > 0 && na < 1 ? Math.round(((Math.asin(na) * 180) / Math.PI) * 1000) / 1000 : 10;
      setField(path, { kind: 'axicon', coneHalfAngleDeg: angle });
    } else if (mode === 'na' && byAngle) {
      const angle = term.coneHalfAngleDeg;
      const na = angle && angle > 0 && angle < 90 ? Math.round(Math.sin((angle * Math.PI) / 180) * 10000) / 10000 : 0.15;
      setField(path, { kind: 'axicon', numericalAperture: na });
    }
  }

  return (
    <div className="flex flex-col gap-4">
      <fieldset className="flex flex-wrap gap-4 text-sm">
        <legend className="mb-1.5 font-bold">Give the cone as</legend>
        <label className="flex items-center gap-2">
          <input type="radio" name={group} className="size-4 accent-[var(--color-teal)]" checked={byAngle} onChange={() => switchTo('angle')} />
          By the cone half-angle β
        </label>
        <label className="flex items-center gap-2">
          <input type="radio" name={group} className="size-4 accent-[var(--color-teal)]" checked={!byAngle} onChange={() => switchTo('na')} />
          By <MathText text="$\sin β = k_r/k$" />
        </label>
      </fieldset>
      {byAngle ? (
        <DesignNumber path={[...path, 'coneHalfAngleDeg']} label="Cone half-angle β" unit="°" hint="Between 0° and 90°." className="max-w-xs" />
      ) : (
        <>
          <DesignNumber
            path={[...path, 'numericalAperture']}
            label="sin β of the cone"
            hint="Between 0 and 1: the radial wavenumber $k_r/k = \sin β$ of the Bessel beam, β the cone half-angle."
            className="max-w-xs"
          />
          <GroupError path={[...path, 'coneHalfAngleDeg']} />
        </>
      )}
      <GroupError path={path} />
      {coreRadiusUm ? (
        <p className="text-sm text-ink-soft">
          Bessel core radius <MathText text="$r_0 = 2.405/(k \sin β)$" /> ≈ <strong className="text-ink tabular-nums">{coreRadiusUm.toPrecision(3)} µm</strong>.
        </p>
      ) : null}
    </div>
  );
}

function CustomFields({ projectId, path, term, canUpload }: { projectId: number; path: FieldPath; term: Extract<DraftTerm, { kind: 'custom' }>; canUpload: boolean }) {
  const phaseMap = useDesignField([...path, 'phaseMap'], { withChildren: true });
  return (
    <div className="flex flex-col gap-2">
      <AssetPicker
        projectId={projectId}
        kind="phase-map"
        legend="Phase map"
        value={term.phaseMap}
        onChange={(ref) => phaseMap.set(ref)}
        canUpload={canUpload}
        error={phaseMap.error ? friendlyMessage(phaseMap.key, phaseMap.error) : undefined}
        dataField={phaseMap.key}
      />
      <p className="text-xs text-ink-soft">The map must have N × N values for the array size in Setup. It is added when the design runs.</p>
    </div>
  );
}

interface TermFieldsProps {
  projectId: number;
  path: FieldPath;
  term: DraftTerm;
  canUpload: boolean;
}

export function TermFields({ projectId, path, term, canUpload }: TermFieldsProps) {
  switch (term.kind) {
    case 'hologram':
      return <HologramTermFields projectId={projectId} path={path} term={term} canUpload={canUpload} />;
    case 'axicon':
      return <AxiconFields path={path} term={term} />;
    case 'vortex':
      return (
        <DesignNumber
          path={[...path, 'charge']}
          label="Topological charge ℓ"
          hint="A whole number, −50 … 50 except 0; the sign sets the sense of the helix."
          className="max-w-xs"
        />
      );
    case 'lens':
      return (
        <DesignNumber
          path={[...path, 'focalLengthUm']}
          label="Focal length f"
          unit="µm"
          hint="Hyperbolic profile; a negative f gives a diverging lens."
          className="max-w-xs"
        />
      );
    case 'tilt':
      return (
        <div className="grid max-w-lg gap-4 sm:grid-cols-2">
          <DesignNumber path={[...path, 'thetaXDeg']} label="Deflection θx" unit="°" hint="Towards +x; between −90° and 90°." />
          <DesignNumber path={[...path, 'thetaYDeg']} label="Deflection θy" unit="°" hint="Towards +y; between −90° and 90°." />
        </div>
      );
    case 'custom':
      return <CustomFields projectId={projectId} path={path} term={term} canUpload={canUpload} />;
  }
}
