import { useState } from 'react';
import { DEFAULT_DETUNE_NM, DEFAULT_WIDTH_BIAS_NM, REDUCED_CELLS, TOLERANCE_LIMIT_NM, TOLERANCE_MAX_POINTS, type ToleranceStudy } from '@shared/schemas/tolerance';
import { Banner, FormErrorBanner } from '@/components/ui/banner';
import { Button } from '@/components/ui/button';
import { Card } from '@/components/ui/card';
import { MathText } from '@/components/ui/math-text';
import { SelectField, TextField } from '@/components/ui/field';
import { isApiError } from '@/lib/api-client';
import { isStudyActive, useTolerance } from '@/features/runs/api/get-tolerance';
import { useStartTolerance } from '@/features/runs/api/start-tolerance';
import { ToleranceChart, type ToleranceQuantity } from '@/features/runs/components/tolerance-charts';

/** Parses "−20, −10, 0, 10" (commas or spaces, either minus sign) into numbers; a message when it cannot. */
function parseList(text: string, name: string): { values: number[]; error?: string } {
  const parts = text
    .replace(/\u2212/g, '-')
    .split(/[\s,;]+/)
    .filter(Boolean);
  const values = parts.map(Number);
  const bad = parts.find((p, i) => !Number.isFinite(values[i]));
  if (bad !== undefined) return { values: [], error: `“${bad}” is not a number of nanometres` };
  if (values.some((v) => Math.abs(v) > TOLERANCE_LIMIT_NM)) return { values: [], error: `each ${name} must lie in −${TOLERANCE_LIMIT_NM}…${TOLERANCE_LIMIT_NM} nm` };
  if (new Set(values).size > TOLERANCE_MAX_POINTS) return { values: [], error: `at most ${TOLERANCE_MAX_POINTS} values` };
  return { values };
}

const listText = (values: number[]) => values.join(', ');

const QUANTITIES: { key: ToleranceQuantity; title: string }[] = [
  { key: 'efficiency', title: 'Efficiency' },
  { key: 'crosstalkDb', title: 'Crosstalk' },
  { key: 'zeroOrder', title: 'Zero order' },
];

interface ToleranceCardProps {
  projectId: number;
  runId: number;
  canRun: boolean;
  channelNames: { a: string; b: string };
}

/** Size-bias and detuning sweeps of a finished run: start form, live status and the curves. */
export function ToleranceCard({ projectId, runId, canRun, channelNames }: ToleranceCardProps) {
  const query = useTolerance(projectId, runId, true);
  const start = useStartTolerance(projectId, runId);
  const [biasText, setBiasText] = useState(listText(DEFAULT_WIDTH_BIAS_NM));
  const [detuneText, setDetuneText] = useState(listText(DEFAULT_DETUNE_NM));
  const [touched, setTouched] = useState(false);
  const [grid, setGrid] = useState<string>('full');
  const study = query.data ?? null;
  const active = isStudyActive(study);
  const bias = parseList(biasText, 'bias');
  const detune = parseList(detuneText, 'detuning');
  const serverDetails = isApiError(start.error) ? start.error.details : {};
  const detailOf = (field: string) => Object.entries(serverDetails).find(([key]) => key === field || key.startsWith(`${field}.`))?.[1];

  const submit = () => {
    setTouched(true);
    if (bias.error || detune.error) return;
    start.mutate({ widthBiasNm: bias.values, detuneNm: detune.values, ...(grid === 'full' ? {} : { cells: Number(grid) }) });
  };

  return (
    <Card
      title="Fabrication bias and detuning sweep"
      description="How the realized device degrades when every pillar comes out wider and longer by Δ (each edge moves out by Δ/2), or is lit at λ + δ: efficiency, crosstalk and zero order per channel, re-simulated from the run’s own layout."
    >
      {canRun ? (
        <form
          aria-label="Start a bias and detuning sweep"
          className="mb-5 grid gap-4 md:grid-cols-[1fr_1fr_12rem_auto] md:items-start"
          onSubmit={(event) => {
            event.preventDefault();
            submit();
          }}
        >
          <TextField
            label="Width and length bias Δ (nm)"
            hint={`Δ is added to the width and to the length of every pillar (each edge moves by Δ/2); up to ${TOLERANCE_MAX_POINTS} values in −${TOLERANCE_LIMIT_NM}…${TOLERANCE_LIMIT_NM} nm.`}
            value={biasText}
            onValueChange={setBiasText}
            error={(touched ? bias.error : undefined) ?? detailOf('widthBiasNm')}
            name="widthBiasNm"
          />
          <TextField
            label="Wavelength detuning δ (nm)"
            hint="Illumination at λ + δ; leave empty to skip."
            value={detuneText}
            onValueChange={setDetuneText}
            error={(touched ? detune.error : undefined) ?? detailOf('detuneNm')}
            name="detuneNm"
          />
          <SelectField
            label="Simulated cells"
            hint="A central crop is quicker; its figures then differ from the run’s."
            value={grid}
            onValueChange={setGrid}
            options={[{ value: 'full', label: 'Whole device' }, ...REDUCED_CELLS.map((n) => ({ value: String(n), label: `Central ${n} × ${n}` }))]}
            error={detailOf('cells')}
            name="cells"
          />
          <Button type="submit" className="md:mt-7" pending={start.isPending} disabled={active || start.isPending}>
            Start the sweep
          </Button>
        </form>
      ) : null}
      {start.isError && Object.keys(serverDetails).length === 0 ? <FormErrorBanner message={start.error.message} /> : null}

      <StudyStatus study={study} loading={query.isPending} loadError={query.isError ? query.error.message : null} />

      {study?.status === 'succeeded' && study.results ? <StudyResults study={study} channelNames={channelNames} /> : null}
    </Card>
  );
}

function StudyStatus({ study, loading, loadError }: { study: ToleranceStudy | null; loading: boolean; loadError: string | null }) {
  if (loadError) return <Banner title="The bias and detuning sweep did not load">{loadError}</Banner>;
  if (loading) return <p className="text-sm text-ink-soft">Loading the bias and detuning sweep…</p>;
  if (!study) return <p className="text-sm text-ink-soft" data-testid="tolerance-status">No bias and detuning sweep of this run yet.</p>;
  if (study.status === 'failed') {
    return (
      <Banner title="The bias and detuning sweep failed">
        <span data-testid="tolerance-status">{study.error}</span>
      </Banner>
    );
  }
  if (study.status === 'succeeded') {
    return (
      <p className="text-sm text-ink-soft" data-testid="tolerance-status">
        Sweep finished{study.durationMs !== null ? ` in ${(study.durationMs / 1000).toFixed(1)} s` : ''}
        {study.results ? ` · ${study.results.msPerPoint.toFixed(0)} ms per point on ${study.results.cells}² cells` : ''}
        {study.results?.reducedFrom ? ` (central crop of the ${study.results.reducedFrom}² device: figures differ from the run’s)` : ''}.
      </p>
    );
  }
  const percent = Math.round(100 * study.progress);
  return (
    <div className="flex flex-col gap-2" data-testid="tolerance-status">
      <p className="text-sm font-bold text-ink">
        {study.status === 'queued' ? 'Waiting for a worker…' : `Running: ${study.stage} (${percent} %)`}
      </p>
      <div role="progressbar" aria-label="Sweep progress" aria-valuemin={0} aria-valuemax={100} aria-valuenow={percent} className="h-2 overflow-hidden rounded-full bg-paper-deep">
        <div className="h-full bg-teal transition-[width]" style={{ width: `${percent}%` }} />
      </div>
    </div>
  );
}

function StudyResults({ study, channelNames }: { study: ToleranceStudy; channelNames: { a: string; b: string } }) {
  const results = study.results!;
  const failedPoints = [...results.widthBias, ...results.detuning].filter((p) => p.error);
  const mismatch = Math.max(0, ...results.widthBias.map((p) => p.mismatchNm ?? 0));
  return (
    <div className="mt-4 flex flex-col gap-5">
      <ul className="list-disc space-y-1 pl-5 text-sm text-ink-soft">
        <li>How biased atoms are found: {results.methodNote}.</li>
        {mismatch > 0 ? <li>Largest gap between a biased size and the library atom standing in for it: {mismatch.toFixed(1)} nm.</li> : null}
        <li>Detuning: {results.detuningNote}.{results.detuningAvailable ? ' Images keep their far-field pixels, so their angles scale with λ + δ.' : ''}</li>
        {(['a', 'b'] as const).map((c) => (
          <li key={c}>
            {channelNames[c]}: efficiency = <MathText text={results.channels[c].efficiencyMeaning} />; crosstalk ={' '}
            <MathText text={results.channels[c].crosstalkMeaning} />.
          </li>
        ))}
        <li>Zero order = {results.zeroOrderMeaning}.</li>
      </ul>
      {failedPoints.length ? (
        <Banner tone="warning" title="Some points could not be computed">
          {failedPoints.map((p) => `Δ = ${p.widthBiasNm} nm, δ = ${p.detuneNm} nm: ${p.error}`).join(' · ')}
        </Banner>
      ) : null}
      {results.widthBias.length ? (
        <section aria-label="Against width bias">
          <h3 className="mb-2 font-extrabold text-ink">Against pillar size bias Δ at λ = {results.designWavelengthNm.toFixed(0)} nm</h3>
          <div className="grid gap-4 lg:grid-cols-3">
            {QUANTITIES.map((q) => (
              <figure key={q.key} className="min-w-0">
                <figcaption className="mb-1 text-sm font-bold text-ink">{q.title}</figcaption>
                <ToleranceChart points={results.widthBias} along="widthBiasNm" quantity={q.key} channelNames={channelNames} />
              </figure>
            ))}
          </div>
        </section>
      ) : null}
      {results.detuning.length ? (
        <section aria-label="Against detuning">
          <h3 className="mb-2 font-extrabold text-ink">Against wavelength detuning δ at Δ = 0</h3>
          <div className="grid gap-4 lg:grid-cols-3">
            {QUANTITIES.map((q) => (
              <figure key={q.key} className="min-w-0">
                <figcaption className="mb-1 text-sm font-bold text-ink">{q.title}</figcaption>
                <ToleranceChart points={results.detuning} along="detuneNm" quantity={q.key} channelNames={channelNames} />
              </figure>
            ))}
          </div>
        </section>
      ) : null}
    </div>
  );
}
