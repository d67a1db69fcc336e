import { useMemo, useState } from 'react';
import type { FarFieldWindow } from '@shared/schemas/design';
import { Banner } from '@/components/ui/banner';
import { AssetPicker } from '@/features/designs/components/asset-picker';
import { DesignNumber, DesignSelect } from '@/features/designs/components/design-inputs';
import { FarFieldDrawing } from '@/features/designs/components/far-field-drawing';
import { useUploads } from '@/features/designs/api/get-uploads';
import { useDesignField } from '@/features/designs/hooks/use-design-field';
import { useDesignEditor } from '@/features/designs/stores/design-editor-store';
import { DEMO_IMAGES } from '@/features/designs/utils/demo-images';
import type { FieldPath, HologramDraft } from '@/features/designs/utils/design-draft';
import { placeFarFieldWindow, setupFigures } from '@/features/designs/utils/far-field';
import { friendlyMessage } from '@/features/designs/utils/friendly-message';

const unitOptions = [
  { value: 'degrees', label: 'Degrees from the zero order' },
  { value: 'direction-cosine', label: 'Direction cosines (sin θ)' },
  { value: 'cells', label: 'Far-field cells of λ/(N·P)' },
] as const;

const algorithmOptions = [
  { value: 'weighted-gs', label: 'Weighted Gerchberg–Saxton' },
  { value: 'gs', label: 'Gerchberg–Saxton' },
  { value: 'mraf', label: 'MRAF (mixed-region amplitude freedom)' },
] as const;

const seenOnOptions = [
  { value: 'far-field', label: 'Far field, evenly in sin θ (focal plane of a Fourier lens)' },
  { value: 'flat-screen', label: 'A flat screen facing the device (picture pre-distorted)' },
] as const;

const UNIT_SUFFIX = { degrees: '°', 'direction-cosine': 'sin θ', cells: 'cells' } as const;

interface HologramTermFieldsProps {
  projectId: number;
  path: FieldPath;
  term: HologramDraft;
  canUpload: boolean;
}

export function HologramTermFields({ projectId, path, term, canUpload }: HologramTermFieldsProps) {
  const setup = useDesignEditor((state) => state.draft?.setup);
  const image = useDesignField([...path, 'image'], { withChildren: true });
  const uploads = useUploads(projectId);
  const [fresnel, setFresnel] = useState(term.fresnelDistanceUm !== undefined);
  const windowSpec = term.window;
  const units = windowSpec?.units ?? 'degrees';
  const unit = UNIT_SUFFIX[units];

  const aspect = useMemo(() => {
    const ref = term.image;
    if (ref?.source === 'demo') {
      const demo = DEMO_IMAGES.find((entry) => entry.name === ref.name);
      return demo ? demo.width / demo.height : 1;
    }
    if (ref?.source === 'upload') {
      const upload = uploads.data?.find((entry) => entry.id === ref.id);
      return upload ? upload.width / upload.height : 1;
    }
    return 1;
  }, [term.image, uploads.data]);

  const figures = setup ? setupFigures(setup.wavelengthNm, setup.periodNm, setup.cells) : null;
  const placement =
    setup && figures && windowSpec && term.fresnelDistanceUm === undefined
      ? placeFarFieldWindow(
          {
            units,
            width: windowSpec.width,
            height: windowSpec.height,
            centerX: windowSpec.centerX ?? 0,
            centerY: windowSpec.centerY ?? 0,
          } as FarFieldWindow,
          setup,
          aspect,
          term.seenOn,
        )
      : null;

  return (
    <div className="flex flex-col gap-5">
      <AssetPicker
        projectId={projectId}
        kind="image"
        legend="Target picture"
        value={term.image}
        onChange={(ref) => image.set(ref)}
        canUpload={canUpload}
        error={image.error ? friendlyMessage(image.key, image.error) : undefined}
        dataField={image.key}
      />

      <div className="grid gap-5 lg:grid-cols-[minmax(0,1fr)_auto]">
        <div className="flex flex-col gap-4">
          {fresnel ? null : (
            <DesignSelect
              path={[...path, 'seenOn']}
              label="Picture seen on"
              options={seenOnOptions}
              onSelect={(value) => {
                const setField = useDesignEditor.getState().setField;
                setField([...path, 'seenOn'], value);
                if (value === 'flat-screen') setField([...path, 'window', 'units'], 'degrees');
              }}
              hint={
                term.seenOn === 'flat-screen'
                  ? 'Window in degrees, to the picture’s edges on the screen. Directions far from the axis land stretched on a flat screen, so the far-field target is squeezed and brightened there to make up for it.'
                  : undefined
              }
            />
          )}
          <DesignSelect path={[...path, 'window', 'units']} label="Window units" options={unitOptions} />
          <div className="grid gap-4 sm:grid-cols-2">
            <DesignNumber path={[...path, 'window', 'width']} label="Window width" unit={unit} />
            <DesignNumber
              path={[...path, 'window', 'height']}
              label="Window height"
              unit={unit}
              placeholder="from the picture"
              hint="Leave empty to keep the picture's aspect ratio."
            />
            <DesignNumber path={[...path, 'window', 'centerX']} label="Window centre x" unit={unit} hint="Offset from the zero order along x." />
            <DesignNumber path={[...path, 'window', 'centerY']} label="Window centre y" unit={unit} hint="Offset from the zero order along y." />
          </div>
        </div>
        {placement && figures ? (
          'error' in placement ? (
            <Banner className="max-w-60 self-start">{placement.error}</Banner>
          ) : (
            <div className="flex flex-col gap-2">
              <FarFieldDrawing figures={figures} placement={placement} label="Target window" />
              {placement.problem ? <Banner className="max-w-60">{placement.problem}</Banner> : null}
            </div>
          )
        ) : null}
      </div>

      <div className="grid gap-4 sm:grid-cols-2">
        <DesignSelect path={[...path, 'algorithm']} label="Phase retrieval" options={algorithmOptions} className="sm:col-span-2" />
        <DesignNumber path={[...path, 'iterations']} label="Iterations" placeholder="100" hint="1 … 5000" />
        <DesignNumber path={[...path, 'seed']} label="Random seed" placeholder="1" hint="Same seed, same result." />
        <DesignNumber path={[...path, 'gamma']} label="Gamma" placeholder="1" hint="Target intensity $I = (g/255)^{γ}$ for gray level g." />
        {term.algorithm === 'mraf' ? (
          <DesignNumber
            path={[...path, 'mixing']}
            label="MRAF target weight m"
            placeholder="0.5"
            hint="Weight of the target in the signal region, in (0, 1]: each iteration sets the window to m × the target amplitude and keeps 1 − m of the light outside it."
          />
        ) : null}
      </div>

      <div className="flex flex-col gap-3 rounded-xl bg-paper px-4 py-3">
        <label className="flex items-center gap-2 text-sm font-bold">
          <input
            type="checkbox"
            className="size-4 accent-[var(--color-teal)]"
            checked={fresnel}
            onChange={(event) => {
              setFresnel(event.target.checked);
              const setField = useDesignEditor.getState().setField;
              if (event.target.checked) {
                setField([...path, 'fresnelDistanceUm'], 1000);
                setField([...path, 'window', 'units'], 'cells');
                setField([...path, 'seenOn'], 'far-field');
              } else {
                setField([...path, 'fresnelDistanceUm'], undefined);
              }
            }}
          />
          Image at a finite distance (Fresnel) instead of the far field
        </label>
        {fresnel ? (
          <>
            <DesignNumber path={[...path, 'fresnelDistanceUm']} label="Image distance z" unit="µm" className="max-w-xs" />
            <p className="text-xs text-ink-soft">
              In this geometry the window is measured in cells of P on the image plane, so its units must be “cells”.
            </p>
          </>
        ) : null}
      </div>
    </div>
  );
}
