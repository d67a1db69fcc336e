import { useMemo } from 'react';
import { readPictureFrames } from '@/features/runs/components/picture-view';
import { Link, useParams } from 'react-router-dom';
import { buildReportModel } from '@shared/report/design-report';
import { Banner } from '@/components/ui/banner';
import { Button } from '@/components/ui/button';
import { PageLoader } from '@/components/ui/spinner';
import { paths } from '@/config/paths';
import { isApiError } from '@/lib/api-client';
import { useRun } from '@/features/runs/api/get-run';
import { useRunReport } from '@/features/fab/api/get-run-report';
import { DesignReport } from '@/features/fab/components/design-report';
import { parseProjectId } from '@/app/routes/app/project/project-context';

const PREVIEW_PATTERN = /^(farfield_(a|b|extra)|phase_[ab]|atom_index|rotation|xz_[ab])\.png$/;

/** Print-friendly design report of a run: no app chrome; print it to PDF from the browser. */
export default function RunReportRoute() {
  const params = useParams();
  const projectId = parseProjectId(params.projectId) ?? 0;
  const runId = parseProjectId(params.runId) ?? 0;
  const report = useRunReport(projectId, runId);
  const run = useRun(projectId, runId);
  const model = useMemo(() => (report.data ? buildReportModel(report.data) : null), [report.data]);
  const frames = readPictureFrames(run.data?.plots ?? null)?.frames;
  const previews = (run.data?.artifacts ?? []).filter((a) => PREVIEW_PATTERN.test(a.name)).map((a) => ({ ...a, frame: frames?.[a.name] }));

  if (report.isPending) return <PageLoader label="Preparing the design report" />;
  if (report.isError) {
    return (
      <div className="mx-auto max-w-xl p-8">
        <Banner title="The design report did not load">
          <p>{isApiError(report.error, 401) ? 'Sign in to read this report.' : report.error.message}</p>
          {isApiError(report.error, 401) ? (
            <Link className="font-bold underline" to={paths.auth.signIn.getHref(paths.projects.runReport.getHref(projectId, runId))}>
              Sign in
            </Link>
          ) : null}
        </Banner>
      </div>
    );
  }
  return (
    <div className="min-h-screen bg-paper py-6 print:bg-white print:py-0">
      <title>{`${model!.title} · Phasewright`}</title>
      <div className="mx-auto mb-4 flex max-w-4xl items-center gap-3 px-2 print:hidden">
        <Link to={paths.projects.run.getHref(projectId, runId)} className="text-sm font-bold text-ink-soft hover:text-ink">
          ← Run {runId}
        </Link>
        <Button size="sm" className="ml-auto" onClick={() => window.print()}>
          Print or save as PDF
        </Button>
      </div>
      <DesignReport model={model!} projectId={projectId} runId={runId} previews={previews} />
    </div>
  );
}
