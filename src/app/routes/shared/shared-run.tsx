import { useMemo } from 'react';
import { useParams } from 'react-router-dom';
import type { RunDetail } from '@shared/schemas/runs';
import { Banner } from '@/components/ui/banner';
import { PageLoader } from '@/components/ui/spinner';
import { ArtifactUrlContext, type ArtifactAddress } from '@/features/runs/api/artifact-url-context';
import { DESIGN_ARTIFACT, useRunDesign } from '@/features/runs/api/get-run-design';
import { groupArtifacts } from '@/features/runs/components/artifact-groups';
import { ConvergenceCard } from '@/features/runs/components/convergence-card';
import { FarFieldPreviews } from '@/features/runs/components/far-field-previews';
import { sectionName } from '@/features/runs/components/format-run';
import { MetricsTable } from '@/features/runs/components/metrics-table';
import { RunDownloads } from '@/features/runs/components/run-downloads';
import { RunFigures } from '@/features/runs/components/run-figures';
import { channelLayout, inputNames } from '@/features/runs/components/run-facts';
import { readNotes, readRunPlots } from '@/features/runs/components/run-plots';
import { RunStatusBadge } from '@/features/runs/components/run-status-badge';
import { RunPictureView } from '@/features/runs/components/picture-view';
import { sharedArtifactHref, sharedTilesHref, useSharedRun } from '@/features/sharing/api/share-links';

/** Share links never reveal the project id; the run components only use it for addresses, which the context replaces. */
const NO_PROJECT = 0;

/** A run opened through a share link: read-only, no app shell, nothing but this run. */
export default function SharedRunRoute() {
  const token = useParams().token ?? '';
  const shared = useSharedRun(token);
  const address = useMemo<ArtifactAddress>(
    () => ({
      href: (name) => sharedArtifactHref(token, name),
      fileName: (name) => `phasewright-shared-run-${name}`,
      tiles: (name) => sharedTilesHref(token, name),
    }),
    [token],
  );
  if (shared.isPending) return <PageLoader label="Opening the shared run" />;
  if (shared.isError) {
    return (
      <main className="mx-auto max-w-2xl p-8">
        <title>Shared run unavailable · Phasewright</title>
        <Banner title="This shared run cannot be shown">{shared.error.message}</Banner>
      </main>
    );
  }
  const { run, projectName, expiresAt } = shared.data;
  return (
    <main className="mx-auto flex max-w-7xl flex-col gap-6 p-6">
      <title>{`Run ${run.id} · ${projectName} · shared · Phasewright`}</title>
      <Banner tone="info" title="Shared read-only view">
        You are looking at one run of “{projectName}” through a share link. Nothing here can be changed.
        {expiresAt ? ` The link works until ${new Date(expiresAt).toLocaleString()}.` : ''}
      </Banner>
      <header className="flex items-center gap-3">
        <h1 className="text-2xl font-extrabold">
          Run {run.id} · revision {run.revisionNumber}
        </h1>
        <RunStatusBadge status={run.status} size="md" />
      </header>
      <ArtifactUrlContext value={address}>
        <SharedRunResults run={run} />
      </ArtifactUrlContext>
    </main>
  );
}

function SharedRunResults({ run }: { run: RunDetail }) {
  const groups = useMemo(() => groupArtifacts(run.artifacts), [run.artifacts]);
  const plots = useMemo(() => readRunPlots(run.plots), [run.plots]);
  const hasDesign = run.artifacts.some((artifact) => artifact.name === DESIGN_ARTIFACT);
  const design = useRunDesign(NO_PROJECT, run.id, hasDesign).data ?? null;
  const notes = readNotes(run.plots).filter((note) => !/laser safety|approximate/i.test(note));
  const mapping = Object.entries(run.metrics ?? {}).find(([key]) => sectionName(key) === 'Atom mapping')?.[1] ?? null;

  const layout = channelLayout(run, design, plots, groups.slices);
  const { channelNames } = layout;

  return (
    <>
      <ConvergenceCard run={run} channelNames={channelNames} />
      <RunPictureView run={run} />
      <FarFieldPreviews projectId={NO_PROJECT} runId={run.id} groups={groups} inputs={inputNames(design)} channelNames={channelNames} />
      <RunFigures projectId={NO_PROJECT} runId={run.id} groups={groups} layout={layout} plots={plots} mapping={mapping} />
      {run.metrics && Object.keys(run.metrics).length > 0 ? <MetricsTable metrics={run.metrics} /> : null}
      {run.artifacts.length > 0 ? <RunDownloads projectId={NO_PROJECT} runId={run.id} downloads={groups.downloads} notes={notes} /> : null}
    </>
  );
}
