import type { QueryClient } from '@tanstack/react-query';
import { useMemo } from 'react';
import { Link, useNavigate, useParams, type LoaderFunctionArgs } from 'react-router-dom';
import { projectRoleAllows } from '@shared/roles';
import type { Design } from '@shared/schemas/design';
import type { RunDetail } from '@shared/schemas/runs';
import { Banner } from '@/components/ui/banner';
import { Button, buttonClasses } from '@/components/ui/button';
import { Card } from '@/components/ui/card';
import { EmptyState } from '@/components/ui/empty-state';
import { ArrowLeftIcon } from '@/components/ui/icons';
import { PageLoader } from '@/components/ui/spinner';
import { paths } from '@/config/paths';
import { isApiError } from '@/lib/api-client';
import { formatDateTime } from '@/lib/format';
import { runQueryOptions, useRun } from '@/features/runs/api/get-run';
import { DESIGN_ARTIFACT, useRunDesign } from '@/features/runs/api/get-run-design';
import { isRunActive } from '@/features/runs/api/run-status';
import { groupArtifacts } from '@/features/runs/components/artifact-groups';
import { DesignRulesCard } from '@/features/runs/components/design-rules-card';
import { ConvergenceCard } from '@/features/runs/components/convergence-card';
import { sectionName } from '@/features/runs/components/format-run';
import { FarFieldPreviews } from '@/features/runs/components/far-field-previews';
import { MappingReportCard, readMappingReport } from '@/features/runs/components/mapping-report-card';
import { MetricsTable } from '@/features/runs/components/metrics-table';
import { RunDownloads } from '@/features/runs/components/run-downloads';
import { RunFigures } from '@/features/runs/components/run-figures';
import { RunEvents } from '@/features/runs/components/run-events';
import { channelLayout, inputNames, readRunLibrary, usesApproximateLibrary } from '@/features/runs/components/run-facts';
import { readDesignRules, readNotes, readRunPlots } from '@/features/runs/components/run-plots';
import { RunStatusPanel } from '@/features/runs/components/run-status-panel';
import { readPictureFrames, RunPictureView } from '@/features/runs/components/picture-view';
import { RunSection, RunSectionIndex } from '@/features/runs/components/run-section-index';
import { ExportPanel } from '@/features/fab/components/export-panel';
import { ShareLinksCard } from '@/features/sharing/components/share-links-card';
import { ToleranceCard } from '@/features/runs/components/tolerance-card';
import { useCurrentUser } from '@/features/auth/api/get-me';
import { useMembers } from '@/features/projects/api/get-members';
import { ReviewThreadsCard } from '@/features/review/components/review-threads-card';
import { useRunReview } from '@/features/review/hooks/use-run-review';
import { runGrid } from '@/features/review/utils/pin-place';
import { parseProjectId, useProjectOutlet } from '@/app/routes/app/project/project-context';

function parseRunId(value: string | undefined): number | null {
  return value && /^[1-9][0-9]{0,9}$/.test(value) ? Number(value) : null;
}

export const clientLoader =
  (queryClient: QueryClient) =>
  async ({ params }: LoaderFunctionArgs) => {
    const projectId = parseProjectId(params.projectId);
    const runId = parseRunId(params.runId);
    if (projectId && runId) await queryClient.prefetchQuery(runQueryOptions(projectId, runId));
    return null;
  };

function BackToRuns({ projectId }: { projectId: number }) {
  return (
    <Link
      to={paths.projects.runs.getHref(projectId)}
      className="mb-4 inline-flex items-center gap-1.5 rounded text-sm font-bold text-ink-soft hover:text-ink"
    >
      <ArrowLeftIcon className="size-4" />
      All runs
    </Link>
  );
}

export default function ProjectRunRoute() {
  const { project } = useProjectOutlet();
  const runId = parseRunId(useParams().runId);
  const run = useRun(project.id, runId);

  if (runId === null || (run.isError && (isApiError(run.error, 404) || isApiError(run.error, 400)))) {
    return (
      <>
        <title>{`Run not found · ${project.name} · Phasewright`}</title>
        <BackToRuns projectId={project.id} />
        <EmptyState
          title="No such run in this project"
          action={
            <Link to={paths.projects.runs.getHref(project.id)} className={buttonClasses('secondary')}>
              See the project’s runs
            </Link>
          }
        >
          The link may be mistyped, or the run belongs to another project.
        </EmptyState>
      </>
    );
  }
  if (run.isPending) return <PageLoader label="Loading the run" />;
  if (run.isError) {
    return (
      <>
        <BackToRuns projectId={project.id} />
        <Banner title="The run did not load">
          <p>{run.error.message}</p>
          <Button variant="secondary" size="sm" className="mt-3" onClick={() => void run.refetch()}>
            Try again
          </Button>
        </Banner>
      </>
    );
  }
  return (
    <RunPage
      projectId={project.id}
      projectName={project.name}
      canRun={projectRoleAllows(project.myRole, 'design') && !project.archived}
      canManage={projectRoleAllows(project.myRole, 'manage')}
      canComment={projectRoleAllows(project.myRole, 'comment')}
      run={run.data}
    />
  );
}

interface RunPageProps {
  projectId: number;
  projectName: string;
  canRun: boolean;
  canManage: boolean;
  canComment: boolean;
  run: RunDetail;
}

function RunPage({ projectId, projectName, canRun, canManage, canComment, run }: RunPageProps) {
  const navigate = useNavigate();
  const me = useCurrentUser();
  const members = useMembers(projectId);
  const review = useRunReview({
    projectId,
    runId: run.id,
    viewer: { userId: me.id, canComment, canDeleteAny: canManage },
    members: members.data ?? [],
    grid: runGrid(run.metrics),
    // Runs with a picture record paint +v (+y) up (README "Picture convention"); older ones have row 0 at the top.
    rows: readPictureFrames(run.plots) ? 'top-is-positive' : 'top-is-negative',
  });
  const groups = useMemo(() => groupArtifacts(run.artifacts), [run.artifacts]);
  const plots = useMemo(() => readRunPlots(run.plots), [run.plots]);
  const designRules = useMemo(() => readDesignRules(run.plots), [run.plots]);
  const mappingReport = useMemo(() => readMappingReport(run.plots), [run.plots]);
  const notes = readNotes(run.plots).filter((note) => !/laser safety|approximate/i.test(note));
  const sectionOf = (name: string) => Object.entries(run.metrics ?? {}).find(([key]) => sectionName(key) === name)?.[1] ?? null;
  const hasDesign = run.artifacts.some((artifact) => artifact.name === DESIGN_ARTIFACT);
  const designQuery = useRunDesign(projectId, run.id, hasDesign);
  const design: Design | null = designQuery.data ?? null;

  const layout = channelLayout(run, design, plots, groups.slices);
  const { channelNames } = layout;
  const approximate = usesApproximateLibrary(run, design);
  const library = readRunLibrary(run.plots);
  const active = isRunActive(run.status);
  const filesDeleted = run.filesDeletedAt !== null;


  return (
    <div className="flex flex-col gap-6">
      <title>{`Run ${run.id} · ${projectName} · Phasewright`}</title>
      <div className="-mb-4">
        <BackToRuns projectId={projectId} />
      </div>
      <RunSectionIndex compareHref={paths.projects.compareRuns.getHref(projectId, run.id)} />
      <RunSection id="summary" className="flex flex-col gap-6">
      <RunStatusPanel
        projectId={projectId}
        run={run}
        canRun={canRun}
        onRestarted={(next) => navigate(paths.projects.run.getHref(projectId, next.id))}
      />

      {approximate ? (
        <Banner tone="warning" title="Approximate atom library">
          This run used the demo atom library. Its pillars are modelled by the effective-index method, not by full-wave
          simulation, so efficiencies, crosstalk and zero order are indicative only. Map the design to your lab’s own
          library before committing to fabrication.
        </Banner>
      ) : library && !library.approximate ? (
        <Banner tone="note" title={`Atom library: ${library.name} (${library.atoms} atoms, not approximate)`}>
          {library.source ? <p>{library.source}</p> : <p>Its uploader marked it as not approximate and gave no source line.</p>}
        </Banner>
      ) : null}

      <div className="grid gap-6 xl:grid-cols-[minmax(0,1fr)_22rem]">
        <div className="min-w-0">
          <ConvergenceCard run={run} channelNames={channelNames} />
          {run.status === 'succeeded' && run.convergence.a.length === 0 && run.convergence.b.length === 0 ? (
            <Card title="Gerchberg–Saxton convergence">
              <p className="text-sm text-ink-soft">
                Neither channel holds an image hologram, so no phase was retrieved: the phases come straight from the
                analytic terms.
              </p>
            </Card>
          ) : null}
        </div>
        <Card title="Status history" className="self-start">
          <RunEvents events={run.events} />
        </Card>
      </div>
      </RunSection>

      {run.filesDeletedAt ? (
        <Banner tone="info" title="This run’s files were deleted">
          They were deleted on {formatDateTime(run.filesDeletedAt)} to free the project’s storage. The status, metrics,
          history and review threads stay; previews, maps, the layout, the fab package and downloads are gone. Run the
          revision again to make new files.
        </Banner>
      ) : null}

      {active ? (
        <Banner tone="info">
          Previews, maps, metrics and files appear here when the run finishes. This page follows the run by itself.
        </Banner>
      ) : null}

      <RunPictureView run={run} />

      <div className="grid gap-6 xl:grid-cols-[minmax(0,1fr)_22rem]">
        <RunSection id="far-fields" className="min-w-0">
          <FarFieldPreviews
            projectId={projectId}
            runId={run.id}
            groups={groups}
            inputs={inputNames(design)}
            channelNames={channelNames}
            annotate={review.annotate}
            reveal={review.reveal}
          />
        </RunSection>
        <RunSection id="review" className="self-start xl:sticky xl:top-20">
        {run.artifacts.length > 0 ? (
          <ReviewThreadsCard
            threads={review.threads}
            loading={review.threadsQuery.isPending}
            error={review.threadsQuery.isError ? review.threadsQuery.error.message : null}
            userId={me.id}
            openThreadId={review.openThreadId}
            numberOf={review.numberOf}
            titleOf={(name) => run.artifacts.find((artifact) => artifact.name === name)?.label || name}
            onJump={review.jumpTo}
          />
        ) : null}
        </RunSection>
      </div>

      <RunFigures
        projectId={projectId}
        runId={run.id}
        groups={groups}
        layout={layout}
        plots={plots}
        mapping={sectionOf('Atom mapping')}
        annotate={review.annotate}
      />

      <RunSection id="design-rules">
      {designRules ? (
        <DesignRulesCard findings={designRules.findings} truncated={designRules.truncated} counts={sectionOf('Design rules')} />
      ) : null}
      </RunSection>

      <RunSection id="mapping">
        {mappingReport ? <MappingReportCard report={mappingReport} figures={sectionOf('Atom mapping')} circularPair={design ? design.polarization.kind === 'circular' : true} /> : null}
      </RunSection>

      <RunSection id="fabrication-sweep">
        {run.status === 'succeeded' && !filesDeleted ? <ToleranceCard projectId={projectId} runId={run.id} canRun={canRun} channelNames={channelNames} /> : null}
      </RunSection>

      <RunSection id="metrics">{run.metrics && Object.keys(run.metrics).length > 0 ? <MetricsTable metrics={run.metrics} circularPair={design ? design.polarization.kind === 'circular' : true} /> : null}</RunSection>

      <RunSection id="files" className="flex flex-col gap-6">

      {run.status === 'succeeded' && !filesDeleted ? <ExportPanel projectId={projectId} runId={run.id} canManage={canManage} /> : null}

      {canManage ? <ShareLinksCard projectId={projectId} runId={run.id} /> : null}

      {run.artifacts.length > 0 || !active ? (
        <RunDownloads
          projectId={projectId}
          runId={run.id}
          downloads={groups.downloads}
          notes={notes}
          filesDeletedAt={run.filesDeletedAt}
          canDelete={canRun && !active}
        />
      ) : null}
      </RunSection>
    </div>
  );
}
