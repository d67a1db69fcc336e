import { useMemo, type FormEvent, type ReactNode } from 'react';
import { LIBRARY_MATERIALS } from '@shared/optics/library-builder';
import type { LibraryBuild, LibraryBuildScope } from '@shared/schemas/library-builds';
import { Banner } from '@/components/ui/banner';
import { Button } from '@/components/ui/button';
import { SelectField, TextField } from '@/components/ui/field';
import { NumberField } from '@/components/ui/number-field';
import { Spinner } from '@/components/ui/spinner';
import { useDebouncedValue } from '@/hooks/use-debounced-value';
import { isApiError, type FieldErrors } from '@/lib/api-client';
import { formatDuration } from '@/features/runs/components/format-run';
import { useLibraryBuildEstimate, useStartLibraryBuild } from '@/features/library-builds/api/library-builds';
import {
  CONSTANT_MATERIAL,
  formSpec,
  needsIndex,
  useBuildForm,
  type BuildForm,
  type MaterialChoice,
} from '@/features/library-builds/stores/build-form-store';

const SCOPE_OPTIONS: { value: LibraryBuildScope; label: string }[] = [
  { value: 'project', label: 'This project' },
  { value: 'personal', label: 'Only me, until I share it with a project' },
];

const ILLUMINATION_OPTIONS: { value: BuildForm['illumination']; label: string }[] = [
  { value: 'substrate', label: 'Through the substrate (exits on the pillar side)' },
  { value: 'superstrate', label: 'Onto the pillars (exits into the substrate)' },
];

const HARMONIC_OPTIONS = Array.from({ length: 14 }, (_, i) => 5 + 2 * i).map((h) => ({ value: String(h), label: `${h} × ${h}` }));

/** Fewest atoms a stored library holds (the library check's default phase levels, shared/optics/atoms.ts). */
const MIN_STORED_ATOMS = 8;

/** Field path of a server problem, without the body's "spec." prefix. */
const specPath = (key: string) => (key.startsWith('spec.') ? key.slice('spec.'.length) : key);

function fieldErrors(error: unknown): FieldErrors {
  const out: FieldErrors = {};
  if (isApiError(error, 400)) for (const [key, message] of Object.entries(error.details)) out[specPath(key)] ??= message;
  return out;
}

/** The problems no box shows (the whole spec, or a field the form does not have). */
const SHOWN_FIELDS = [
  'name', 'wavelengthNm', 'periodNm', 'heightNm', 'illumination', 'harmonics', 'scope', 'subsetSize',
  'sweep.minFeatureNm', 'sweep.minGapNm', 'sweep.stepNm',
  ...['pillar', 'substrate', 'superstrate'].flatMap((m) => [m, `${m}.n`, `${m}.k`, `${m}.name`]),
];

function MaterialFields({
  role,
  label,
  choice,
  errors,
  includeAir,
  onChange,
}: {
  role: 'pillar' | 'substrate' | 'superstrate';
  label: string;
  choice: MaterialChoice;
  errors: FieldErrors;
  includeAir: boolean;
  onChange: (choice: MaterialChoice) => void;
}) {
  const options = [
    ...LIBRARY_MATERIALS.filter((m) => includeAir || m.id !== 'air').map((m) => ({ value: m.id, label: m.name })),
    { value: CONSTANT_MATERIAL, label: 'Constant n + ik (your own film)' },
  ];
  const entry = LIBRARY_MATERIALS.find((m) => m.id === choice.id);
  const hint: ReactNode = entry ? (
    <>
      Source: {entry.source}
      {entry.fromMemory ? ' (coefficients written down from memory)' : ''}
      {entry.minLambda !== undefined && entry.maxLambda !== undefined && Number.isFinite(entry.maxLambda) && entry.minLambda > 0
        ? `; valid ${Math.round(entry.minLambda * 1e9)}–${Math.round(entry.maxLambda * 1e9)} nm`
        : ''}
      {entry.needsIndex ? '. Its index depends on how the film is made: give your film’s n and k.' : ''}
    </>
  ) : (
    'The same n + ik at every wavelength: your film’s measured index at the design wavelength.'
  );
  return (
    <fieldset className="flex min-w-0 flex-col gap-3">
      <legend className="sr-only">{label}</legend>
      <SelectField label={label} value={choice.id} options={options} hint={hint} error={errors[role]} onValueChange={(id) => onChange({ ...choice, id })} />
      {needsIndex(choice) ? (
        <div className="grid grid-cols-2 gap-3">
          <NumberField label={`${label}: n`} value={choice.n} onValueChange={(n) => onChange({ ...choice, n })} error={errors[`${role}.n`]} />
          <NumberField label={`${label}: k`} value={choice.k} onValueChange={(k) => onChange({ ...choice, k })} error={errors[`${role}.k`]} hint="0: no absorption" />
          {choice.id === CONSTANT_MATERIAL ? (
            <TextField
              wrapperClassName="col-span-2"
              label={`${label}: name (optional)`}
              value={choice.label}
              maxLength={80}
              onValueChange={(text) => onChange({ ...choice, label: text })}
              error={errors[`${role}.name`]}
            />
          ) : null}
        </div>
      ) : null}
    </fieldset>
  );
}

function Section({ title, children }: { title: string; children: ReactNode }) {
  return (
    <fieldset className="flex flex-col gap-3 border-t border-line pt-4">
      <legend className="pr-2 text-sm font-extrabold text-ink">{title}</legend>
      {children}
    </fieldset>
  );
}

function EstimatePanel({ estimate, settling }: { estimate: ReturnType<typeof useLibraryBuildEstimate>; settling: boolean }) {
  const data = estimate.isError ? null : estimate.data;
  return (
    <section aria-labelledby="build-estimate-title" className="flex flex-col gap-3 rounded-2xl bg-paper-deep p-4 ring-1 ring-line">
      <h3 id="build-estimate-title" className="flex items-center gap-2 text-sm font-extrabold text-ink">
        Cost estimate
        {settling ? <Spinner className="size-4 text-ember" /> : null}
      </h3>
      <div aria-live="polite" className="text-sm">
        {estimate.isError ? (
          <p className="text-ink-soft">
            {isApiError(estimate.error, 400) ? 'Fix the fields marked below to see the estimate.' : `No estimate: ${estimate.error.message}`}
          </p>
        ) : data ? (
          <>
            <p data-testid="build-estimate">
              <strong className="tabular-nums">{data.atoms}</strong> atoms × <strong className="tabular-nums">{formatSeconds(data.secondsPerAtom)}</strong> per atom
              at {data.harmonics} × {data.harmonics} harmonics ≈ <strong className="tabular-nums">{formatDuration(data.seconds * 1000)}</strong>
            </p>
            <p className="mt-1 text-xs text-ink-soft">{data.basis}</p>
            {data.atoms < MIN_STORED_ATOMS ? (
              <p className="mt-2 font-semibold text-ember-deep">
                A stored library needs at least {MIN_STORED_ATOMS} atoms whose phases step by at most 2π/{MIN_STORED_ATOMS} on each axis: take a
                smaller step, or this build will compute but not be stored.
              </p>
            ) : null}
          </>
        ) : (
          <p className="text-ink-soft">Working out the estimate…</p>
        )}
      </div>
      {data && data.warnings.length > 0 ? (
        <Banner tone="warning" title="The lattice itself diffracts">
          <ul className="list-disc pl-5">
            {data.warnings.map((w) => (
              <li key={w}>{w}</li>
            ))}
          </ul>
          <p className="mt-1">The library keeps the zeroth order only; the light in the other orders is lost to the design. A smaller period avoids it.</p>
        </Banner>
      ) : null}
    </section>
  );
}

/** Seconds per atom, to two significant digits. Example: formatSeconds(0.0342) → "0.034 s". */
function formatSeconds(seconds: number): string {
  return `${Number(seconds.toPrecision(2))} s`;
}

/** "Compute a library": the spec, a live cost estimate and the lattice warnings, then the start of the job. */
export function ComputeLibraryForm({ projectId, onStarted }: { projectId: number; onStarted: (build: LibraryBuild) => void }) {
  const form = useBuildForm((state) => state.form);
  const update = useBuildForm((state) => state.update);
  const start = useStartLibraryBuild(projectId);
  const spec = useMemo(() => formSpec(form), [form]);
  const debounced = useDebouncedValue(spec, 400);
  const estimate = useLibraryBuildEstimate(projectId, debounced);
  // The start's problems while they are fresh, else the estimate's (both come from the server's spec check).
  const errors = start.error ? fieldErrors(start.error) : fieldErrors(estimate.error);
  const otherProblems = Object.entries(errors).filter(([key]) => !SHOWN_FIELDS.includes(key));
  const change = (patch: Partial<BuildForm>) => {
    update(patch);
    start.reset();
  };

  const submit = (event: FormEvent) => {
    event.preventDefault();
    start.mutate({ spec, scope: form.scope, ...(form.subsetSize !== undefined ? { subsetSize: form.subsetSize } : {}) }, { onSuccess: ({ build }) => onStarted(build) });
  };

  return (
    <form onSubmit={submit} noValidate className="flex flex-col gap-5" aria-label="Compute a library">
      <TextField label="Library name" value={form.name} maxLength={120} onValueChange={(name) => change({ name })} error={errors.name} hint="Empty: named after the materials, wavelength and period." />
      <Section title="Materials">
        <div className="grid gap-4 md:grid-cols-3">
          <MaterialFields role="pillar" label="Pillar material" choice={form.pillar} errors={errors} includeAir={false} onChange={(pillar) => change({ pillar })} />
          <MaterialFields role="substrate" label="Substrate" choice={form.substrate} errors={errors} includeAir onChange={(substrate) => change({ substrate })} />
          <MaterialFields role="superstrate" label="Superstrate (above the pillars)" choice={form.superstrate} errors={errors} includeAir onChange={(superstrate) => change({ superstrate })} />
        </div>
        <SelectField
          label="Illumination side"
          value={form.illumination}
          options={ILLUMINATION_OPTIONS}
          onValueChange={(illumination) => change({ illumination })}
          error={errors.illumination}
          hint="It decides which medium the light meets first and which it leaves into, so where the lattice diffracts."
        />
      </Section>
      <Section title="Cell">
        <div className="grid gap-4 sm:grid-cols-3">
          <NumberField label="Wavelength λ" unit="nm" value={form.wavelengthNm} onValueChange={(wavelengthNm) => change({ wavelengthNm })} error={errors.wavelengthNm} />
          <NumberField label="Period P" unit="nm" value={form.periodNm} onValueChange={(periodNm) => change({ periodNm })} error={errors.periodNm} />
          <NumberField label="Pillar height" unit="nm" value={form.heightNm} onValueChange={(heightNm) => change({ heightNm })} error={errors.heightNm} />
        </div>
      </Section>
      <Section title="Sweep of widths w and lengths l">
        <div className="grid gap-4 sm:grid-cols-3">
          <NumberField label="Smallest feature" unit="nm" value={form.minFeatureNm} onValueChange={(minFeatureNm) => change({ minFeatureNm })} error={errors['sweep.minFeatureNm']} />
          <NumberField label="Smallest gap" unit="nm" value={form.minGapNm} onValueChange={(minGapNm) => change({ minGapNm })} error={errors['sweep.minGapNm']} hint="Largest pillar: P minus this gap." />
          <NumberField label="Step" unit="nm" value={form.stepNm} onValueChange={(stepNm) => change({ stepNm })} error={errors['sweep.stepNm']} />
        </div>
      </Section>
      <Section title="Computation and result">
        <div className="grid gap-4 sm:grid-cols-3">
          <SelectField
            label="Harmonics"
            value={String(form.harmonics)}
            options={HARMONIC_OPTIONS}
            onValueChange={(value) => change({ harmonics: Number(value) })}
            error={errors.harmonics}
            hint="Fourier orders per axis; more is slower and more exact."
          />
          <SelectField label="Who can use the library" value={form.scope} options={SCOPE_OPTIONS} onValueChange={(scope) => change({ scope })} error={errors.scope} />
          <NumberField
            label="Proposed subset size N"
            value={form.subsetSize}
            onValueChange={(subsetSize) => change({ subsetSize })}
            error={errors.subsetSize}
            hint="Optional: the N atoms that cover the (α_x, α_y) square best at high transmission."
          />
        </div>
      </Section>
      <EstimatePanel estimate={estimate} settling={debounced !== spec || estimate.isFetching} />
      {otherProblems.length > 0 ? (
        <Banner title="The spec has problems">
          <ul className="list-disc pl-5">
            {otherProblems.map(([key, message]) => (
              <li key={key}>
                <strong>{key}</strong>: {message}
              </li>
            ))}
          </ul>
        </Banner>
      ) : null}
      {start.error ? <Banner title="The build did not start">{start.error.message}</Banner> : null}
      <div>
        <Button type="submit" pending={start.isPending}>
          Start computing
        </Button>
      </div>
    </form>
  );
}
