import { useParams } from 'react-router-dom';
import { Banner } from '@/components/ui/banner';
import { Card } from '@/components/ui/card';
import { PageLoader } from '@/components/ui/spinner';
import { formatBytes } from '@/features/runs/components/artifact-groups';
import { MetricsTable } from '@/features/runs/components/metrics-table';
import { RunStatusBadge } from '@/features/runs/components/run-status-badge';
import { sharedArtifactHref, useSharedRun } from '@/features/sharing/api/share-links';

/** A run opened through a share link: read-only, no app shell, nothing but this run. */
export default function SharedRunRoute() {
  const token = useParams().token ?? '';
  const shared = useSharedRun(token);
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
  const images = run.artifacts.filter((a) => a.mime === 'image/png');
  return (
    <main className="mx-auto flex max-w-6xl flex-col gap-6 p-6">
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
      {images.length ? (
        <Card title="Previews">
          <div className="grid gap-4 sm:grid-cols-2 lg:grid-cols-3">
            {images.map((image) => (
              <figure key={image.name}>
                <img src={sharedArtifactHref(token, image.name)} alt={image.name} className="w-full rounded-lg ring-1 ring-line" loading="lazy" />
                <figcaption className="mt-1 font-mono text-xs text-ink-soft">{image.name}</figcaption>
              </figure>
            ))}
          </div>
        </Card>
      ) : null}
      {run.metrics && Object.keys(run.metrics).length > 0 ? <MetricsTable metrics={run.metrics} /> : null}
      {run.artifacts.length ? (
        <Card title="Files">
          <ul className="text-sm">
            {run.artifacts.map((a) => (
              <li key={a.name}>
                <a className="font-bold underline" href={sharedArtifactHref(token, a.name)}>
                  {a.name}
                </a>{' '}
                <span className="text-ink-soft">{formatBytes(a.size)}</span>
              </li>
            ))}
          </ul>
        </Card>
      ) : null}
    </main>
  );
}
