import { useState } from 'react';
import { Link } from 'react-router-dom';
import { exportOverrideSchema } from '@shared/schemas/fab';
import { Banner } from '@/components/ui/banner';
import { Button, buttonClasses } from '@/components/ui/button';
import { Card } from '@/components/ui/card';
import { TextAreaField, TextField } from '@/components/ui/field';
import { paths } from '@/config/paths';
import { formatDateTime } from '@/lib/format';
import { fabPackageHref } from '@/features/fab/api/fab-package-href';
import { useCreateExportOverride } from '@/features/fab/api/create-export-override';
import { useDesignCheck } from '@/features/fab/api/get-design-check';

function OverrideForm({ projectId, runId }: { projectId: number; runId: number }) {
  const [reason, setReason] = useState('');
  const [error, setError] = useState<string | undefined>();
  const create = useCreateExportOverride(projectId, runId);
  return (
    <form
      className="mt-3 flex flex-col gap-2"
      onSubmit={(event) => {
        event.preventDefault();
        const parsed = exportOverrideSchema.safeParse({ reason });
        if (!parsed.success) return setError(parsed.error.issues[0]?.message);
        setError(undefined);
        create.mutate(parsed.data.reason, { onError: (e) => setError(e.message) });
      }}
    >
      <TextAreaField
        label="Reason for exporting despite the violations"
        value={reason}
        onValueChange={setReason}
        error={error}
        hint="10–500 characters. Recorded with your name and shown in the design report."
        rows={3}
      />
      <Button type="submit" variant="danger" size="sm" pending={create.isPending} className="self-start">
        Override and allow export
      </Button>
    </form>
  );
}

interface GdsOptionsText {
  layer: string;
  datatype: string;
  dbUnitNm: string;
}

/** Options typed by the user → the query of the package link; empty fields keep the run's own values. */
function gdsOptions(text: GdsOptionsText): { options: { layer?: number; datatype?: number; dbUnitNm?: number }; problem: string | null } {
  const options: { layer?: number; datatype?: number; dbUnitNm?: number } = {};
  for (const key of ['layer', 'datatype'] as const) {
    if (text[key].trim() === '') continue;
    const value = Number(text[key]);
    if (!Number.isInteger(value) || value < 0 || value > 255) return { options, problem: `GDSII ${key} must be a whole number from 0 to 255` };
    options[key] = value;
  }
  if (text.dbUnitNm.trim() !== '') {
    const value = Number(text.dbUnitNm);
    if (!(value >= 0.001 && value <= 100)) return { options, problem: 'The database unit must lie between 0.001 and 100 nm' };
    options.dbUnitNm = value;
  }
  return { options, problem: null };
}

/** Links to the layout, the design report and the fab package, with the DRC verdict that gates the export. */
export function ExportPanel({ projectId, runId, canManage }: { projectId: number; runId: number; canManage: boolean }) {
  const check = useDesignCheck(projectId, runId);
  const [optionsText, setOptionsText] = useState<GdsOptionsText>({ layer: '', datatype: '', dbUnitNm: '' });
  const { options, problem } = gdsOptions(optionsText);
  const blocked = (check.data && !check.data.exportAllowed) || problem !== null;
  return (
    <Card title="Layout and fab package" description="Look at the pillars, print the design report, and download the package for the fab.">
      <div className="flex flex-wrap gap-2">
        <Link to={paths.projects.runLayout.getHref(projectId, runId)} className={buttonClasses('secondary', 'sm')}>
          Layout
        </Link>
        <a href={paths.projects.runReport.getHref(projectId, runId)} target="_blank" rel="noopener" className={buttonClasses('secondary', 'sm')}>
          Design report
        </a>
        {blocked ? (
          <span className={buttonClasses('primary', 'sm', 'pointer-events-none opacity-55')} aria-disabled="true">
            Download fab package
          </span>
        ) : (
          <a href={fabPackageHref(projectId, runId, options)} download className={buttonClasses('primary', 'sm')}>
            Download fab package
          </a>
        )}
      </div>
      <details className="mt-3 text-sm">
        <summary className="cursor-pointer font-bold text-ink-soft">GDSII options of the package</summary>
        <div className="mt-2 grid gap-3 sm:grid-cols-3">
          <TextField label="GDSII layer" inputMode="numeric" placeholder="as designed" value={optionsText.layer} onValueChange={(layer) => setOptionsText((o) => ({ ...o, layer }))} hint="0 … 255" />
          <TextField label="GDSII datatype" inputMode="numeric" placeholder="as designed" value={optionsText.datatype} onValueChange={(datatype) => setOptionsText((o) => ({ ...o, datatype }))} hint="0 … 255" />
          <TextField label="Database unit (nm)" inputMode="decimal" placeholder="1" value={optionsText.dbUnitNm} onValueChange={(dbUnitNm) => setOptionsText((o) => ({ ...o, dbUnitNm }))} hint="0.001 … 100 nm" />
        </div>
        {problem ? <p className="mt-2 font-bold text-danger" role="alert">{problem}</p> : null}
      </details>
      {check.isError ? <Banner className="mt-3" title="The design-rule result did not load">{check.error.message}</Banner> : null}
      {check.data ? (
        <div className="mt-3 text-sm" data-testid="drc-verdict">
          {check.data.total === 0 ? (
            <p>Design rules passed (gap ≥ {check.data.rules.minGapNm} nm, feature ≥ {check.data.rules.minFeatureNm} nm, aspect ratio ≤ {check.data.rules.maxAspectRatio}).</p>
          ) : (
            <Banner tone={check.data.exportAllowed ? 'warning' : 'error'} title={`${check.data.total} design-rule violation${check.data.total === 1 ? '' : 's'}`}>
              <p>
                {check.data.counts.gap} gap, {check.data.counts.feature} feature, {check.data.counts['aspect-ratio']} aspect ratio.{' '}
                {check.data.exportAllowed ? 'An owner has overridden them; export is allowed.' : 'Export is refused until they are fixed or a project owner overrides them with a reason.'}
              </p>
              {check.data.overrides.map((o) => (
                <p key={o.id} className="mt-1">
                  Override by {o.by?.name ?? 'a former member'}, {formatDateTime(o.at)}: “{o.reason}”
                </p>
              ))}
              {!check.data.exportAllowed && canManage ? <OverrideForm projectId={projectId} runId={runId} /> : null}
            </Banner>
          )}
        </div>
      ) : null}
    </Card>
  );
}
