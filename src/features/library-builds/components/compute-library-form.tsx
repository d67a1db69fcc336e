import { useMemo, type FormEvent, type ReactNode } from 'react';
import { LIBRARY_MATERIALS } from '@shared/optics/library-builder';
import { NK_TABLE_HEADER, NK_TABLE_LIMITS, NK_TABLE_TEXT_LIMITS, nkTableRange, parseNkTableCsv, type NkTable } from '@shared/optics/nk-table';
import type { LibraryBuild, LibraryBuildScope } from '@shared/schemas/library-builds';
import { Banner } from '@/components/ui/banner';
import { Button } from '@/components/ui/button';
import { FieldShell, SelectField, TextField } from '@/components/ui/field';
import { NumberField } from '@/components/ui/number-field';
import { Spinner } from '@/components/ui/spinner';
import { useDebouncedValue } from '@/hooks/use-debounced-value';
import { isApiError, type FieldErrors } from '@/lib/api-client';
import { formatDuration } from '@/features/runs/components/format-run';
import { useLibraryBuildEstimate, useStartLibraryBuild } from '@/features/library-builds/api/library-builds';
import { BuildWarnings } from '@/features/library-builds/components/build-warnings';
import {
  CONSTANT_MATERIAL,
  TABLE_MATERIAL,
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

/** Field path of a server problem, without the body's "spec." prefix. */
const specPath = (key: string) => (key.startsWith('spec.') ? key.slice('spec.'.length) : key);

function fieldErrors(error: unknown): FieldErrors {
  const out: FieldErrors = {};
  if (isApiError(error, 400)) for (const [key, message] of Object.entries(error.details)) out[specPath(key)] ??= message;
  return out;
}

/** The fields a box of the form shows the problems of; others (the whole spec) are listed below the form. */
const SHOWN_FIELDS = [
  'name', 'wavelengthNm', 'periodNm', 'heightNm', 'illumination', 'harmonics', 'scope', 'subsetSize',
  'sweep.minFeatureNm', 'sweep.minGapNm', 'sweep.stepNm',
  ...['pillar', 'substrate', 'superstrate'].flatMap((m) => [m, `${m}.n`, `${m}.k`, `${m}.name`, `${m}.source`, `${m}.table`]),
];
/** `pillar.table[3]` is shown with `pillar.table`. */
const shownField = (key: string) => SHOWN_FIELDS.includes(key.replace(/\[\d+\]$/, ''));

/** The first problem of a tabulated material's rows: the table as a whole, else its first row at fault. */
function tableProblem(errors: FieldErrors, role: string): string | undefined {
  if (errors[`${role}.table`]) return errors[`${role}.table`];
  const row = Object.keys(errors).find((key) => key.startsWith(`${role}.table[`));
  return row ? `row ${Number(/\[(\d+)\]/.exec(row)![1]) + 1} of the table: ${errors[row]}` : undefined;
}

/** Largest CSV read for a table: its rows times its longest line (the parser stops at either anyway). */
const MAX_TABLE_BYTES = NK_TABLE_LIMITS.maxRows * NK_TABLE_LIMITS.maxLineChars;

/** "12 rows, 400–800 nm, n 2.01–2.10, k 0–0.02". */
function describeTable(table: NkTable): string {
  const { minNm, maxNm } = nkTableRange(table);
  const span = (i: 1 | 2) => {
    const values = table.points.map((p) => p[i]);
    const lo = Math.min(...values);
    const hi = Math.max(...values);
    return lo === hi ? `${lo}` : `${lo}–${hi}`;
  };
  return `${table.points.length} rows, ${minNm}–${maxNm} nm, n ${span(1)}, k ${span(2)}`;
}

function TableFields({ role, label, choice, errors, onChange }: { role: string; label: string; choice: MaterialChoice; errors: FieldErrors; onChange: (choice: MaterialChoice) => void }) {
  const problem = choice.tableError ?? tableProblem(errors, role);
  const read = async (file: File | undefined) => {
    if (!file) return onChange({ ...choice, table: null, tableFile: '', tableError: null });
    if (file.size > MAX_TABLE_BYTES) {
      return onChange({ ...choice, table: null, tableFile: file.name, tableError: `${file.name} is larger than ${Math.round(MAX_TABLE_BYTES / 1000)} kB: thin the table` });
    }
    try {
      const table = parseNkTableCsv(await file.text());
      onChange({ ...choice, table, tableFile: file.name, tableError: null, label: choice.label.trim() || table.name || file.name.replace(/\.csv$/i, '').slice(0, NK_TABLE_TEXT_LIMITS.name) });
    } catch (error) {
      onChange({ ...choice, table: null, tableFile: file.name, tableError: `${file.name}: ${(error as Error).message}` });
    }
  };
  return (
    <div className="flex flex-col gap-3">
      <FieldShell
        label={`${label}: n, k table (CSV)`}
        error={problem}
        hint={
          choice.table
            ? `${choice.tableFile}: ${describeTable(choice.table)}${choice.table.source ? `; source: ${choice.table.source}` : ''}.`
            : `Header ${NK_TABLE_HEADER.join(',')}, then one row per vacuum wavelength in nm, rising; # name: and # source: lines name the film and where the numbers come from. Interpolated linearly; the design wavelength must lie inside the table.`
        }
      >
        {({ controlId, describedBy, invalid }) => (
          <input
            id={controlId}
            type="file"
            accept=".csv,text/csv"
            aria-invalid={invalid || undefined}
            aria-describedby={describedBy}
            className="text-sm file:mr-3 file:rounded-full file:border-0 file:bg-paper-deep file:px-4 file:py-2 file:font-bold file:text-ink"
            onChange={(event) => void read(event.target.files?.[0])}
          />
        )}
      </FieldShell>
      <TextField
        label={`${label}: name`}
        value={choice.label}
        maxLength={NK_TABLE_TEXT_LIMITS.name}
        onValueChange={(text) => onChange({ ...choice, label: text })}
        error={errors[`${role}.name`] ?? errors[`${role}.source`]}
      />
    </div>
  );
}

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
    { value: TABLE_MATERIAL, label: 'n, k table (CSV)' },
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
  ) : choice.id === TABLE_MATERIAL ? (
    'Your film’s measured n and k against wavelength.'
  ) : (
    'The same n + ik at every wavelength: your film’s measured index at the design wavelength.'
  );
  return (
    <fieldset className="flex min-w-0 flex-col gap-3">
      <legend className="sr-only">{label}</legend>
      <SelectField label={label} value={choice.id} options={options} hint={hint} error={errors[role]} onValueChange={(id) => onChange({ ...choice, id })} />
      {choice.id === TABLE_MATERIAL ? <TableFields role={role} label={label} choice={choice} errors={errors} onChange={onChange} /> : null}
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
          </>
        ) : (
          <p className="text-ink-soft">Working out the estimate…</p>
        )}
      </div>
      {data && data.warnings.length > 0 ? (
        <BuildWarnings warnings={data.warnings} title="Before you start" />
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
  const otherProblems = Object.entries(errors).filter(([key]) => !shownField(key));
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
          <NumberField label="Smallest gap" unit="nm" value={form.minGapNm} onValueChange={(minGapNm) => change({ minGapNm })} error={errors['sweep.minGapNm']} hint="Largest pillar: at most P minus this gap." />
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
