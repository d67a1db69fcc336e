import { create } from 'zustand';
import { LIBRARY_MATERIALS, type LibrarySpec, type SpecMaterial } from '@shared/optics/library-builder';
import type { NkTable } from '@shared/optics/nk-table';
import type { LibraryBuildScope } from '@shared/schemas/library-builds';

/** 'constant': the user's own n + ik; 'table': an n, k(λ) table from a CSV; any other value is a material id of LIBRARY_MATERIALS. */
export const CONSTANT_MATERIAL = 'constant';
export const TABLE_MATERIAL = 'table';

export interface MaterialChoice {
  id: string;
  /** The film's own index, for 'constant' and for listed materials that need it (amorphous silicon). */
  n: number | undefined;
  k: number | undefined;
  /** Name of a constant material (optional) or of a tabulated one (required). */
  label: string;
  /** The tabulated material read from the user's CSV (nk-table.ts), its file name and why it was refused. */
  table: NkTable | null;
  tableFile: string;
  tableError: string | null;
}

export interface BuildForm {
  name: string;
  pillar: MaterialChoice;
  substrate: MaterialChoice;
  superstrate: MaterialChoice;
  illumination: LibrarySpec['illumination'];
  wavelengthNm: number | undefined;
  periodNm: number | undefined;
  heightNm: number | undefined;
  minFeatureNm: number | undefined;
  minGapNm: number | undefined;
  stepNm: number | undefined;
  harmonics: number;
  scope: LibraryBuildScope;
  /** Proposed subset size N; undefined: no subset. */
  subsetSize: number | undefined;
}

const listed = (id: string): MaterialChoice => ({ id, n: undefined, k: undefined, label: '', table: null, tableFile: '', tableError: null });

/**
 * Si₃N₄ pillars 1200 nm tall on fused silica at 633 nm, in a 400 nm period: below λ/n of fused silica (434 nm),
 * so the lattice itself does not diffract.
 */
export const DEFAULT_BUILD_FORM: BuildForm = {
  name: '',
  pillar: listed('silicon-nitride'),
  substrate: listed('fused-silica'),
  superstrate: listed('air'),
  illumination: 'substrate',
  wavelengthNm: 633,
  periodNm: 400,
  heightNm: 1200,
  minFeatureNm: 80,
  minGapNm: 60,
  stepNm: 20,
  harmonics: 11,
  scope: 'project',
  subsetSize: undefined,
};

/** Whether a choice needs the n, k boxes: the user's own constant, or a listed material without a model. */
export function needsIndex(choice: MaterialChoice): boolean {
  return choice.id === CONSTANT_MATERIAL || Boolean(LIBRARY_MATERIALS.find((m) => m.id === choice.id)?.needsIndex);
}

function specMaterial(choice: MaterialChoice): SpecMaterial {
  if (choice.id === TABLE_MATERIAL) {
    // No table yet: an empty one, so the server's check says what is missing beside the file box.
    const source = choice.table?.source;
    return { name: choice.label.trim(), ...(source ? { source } : {}), table: choice.table ? [...choice.table.points] : [] };
  }
  if (!needsIndex(choice)) return choice.id;
  const name = choice.id === CONSTANT_MATERIAL ? choice.label.trim() || undefined : choice.id;
  return { ...(name ? { name } : {}), n: choice.n as number, k: choice.k ?? 0 };
}

/** The spec the form describes; empty boxes are left out so the server says which field is missing. */
export function formSpec(form: BuildForm): LibrarySpec {
  return {
    name: form.name.trim(),
    wavelengthNm: form.wavelengthNm as number,
    periodNm: form.periodNm as number,
    heightNm: form.heightNm as number,
    pillar: specMaterial(form.pillar),
    substrate: specMaterial(form.substrate),
    superstrate: specMaterial(form.superstrate),
    illumination: form.illumination,
    sweep: { minFeatureNm: form.minFeatureNm as number, minGapNm: form.minGapNm as number, stepNm: form.stepNm as number },
    harmonics: form.harmonics,
  };
}

interface BuildFormState {
  form: BuildForm;
  update: (patch: Partial<BuildForm>) => void;
  reset: () => void;
}

/** The "Compute a library" form, kept while the user looks at a build and comes back. */
export const useBuildForm = create<BuildFormState>()((set) => ({
  form: DEFAULT_BUILD_FORM,
  update: (patch) => set((state) => ({ form: { ...state.form, ...patch } })),
  reset: () => set({ form: DEFAULT_BUILD_FORM }),
}));
