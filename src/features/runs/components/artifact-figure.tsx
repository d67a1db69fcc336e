import type { ReactNode } from 'react';
import type { RunArtifact } from '@shared/schemas/runs';
import { ZoomPanImage, type PictureAnnotation } from '@/components/ui/zoom-pan-image';
import { useArtifactAddress } from '@/features/runs/api/artifact-url-context';
import { useTileSource } from '@/features/runs/api/get-tile-pyramid';
import { formatBytes } from '@/features/runs/components/artifact-groups';
import { usePictureFrame } from '@/features/runs/components/picture-view';

interface ArtifactFigureProps {
  projectId: number;
  runId: number;
  artifact: RunArtifact;
  title: string;
  children?: ReactNode;
  aspect?: number;
  annotation?: PictureAnnotation;
}

/** One stored picture of a run, large, zoomable, with its caption and a download link. */
export function ArtifactFigure({ projectId, runId, artifact, title, children, aspect, annotation }: ArtifactFigureProps) {
  const href = useArtifactAddress(projectId, runId).href(artifact.name);
  const view = usePictureFrame(runId, artifact.name);
  const tiles = useTileSource(projectId, runId, artifact.name, artifact.tiled === true);
  return (
    <figure className="flex min-w-0 flex-col gap-2">
      <figcaption className="flex flex-wrap items-baseline justify-between gap-x-3 gap-y-1">
        <span className="font-extrabold">{title}</span>
        <span className="flex flex-wrap items-center gap-3">
          {annotation?.controls}
          <DownloadLink projectId={projectId} runId={runId} artifact={artifact} compact />
        </span>
      </figcaption>
      {artifact.label && artifact.label !== title ? <p className="-mt-1 text-sm text-ink-soft">{artifact.label}</p> : null}
      {tiles.settled ? (
        <ZoomPanImage
          src={href}
          alt={`${title}${artifact.label && artifact.label !== title ? ` — ${artifact.label}` : ''}`}
          aspect={aspect}
          tiles={tiles.source}
          overlay={annotation?.overlay}
          onPick={annotation?.onPick}
          axes={view.frame}
          mirrored={view.mirrored}
        />
      ) : (
        // The tiles' manifest comes first (a small request), so the whole PNG is not fetched when tiles will do.
        <div className="aspect-square w-full animate-pulse rounded-xl bg-paper-deep ring-1 ring-line" role="status" aria-label={`Loading ${title}`} />
      )}
      {annotation?.panel}
      {children}
    </figure>
  );
}

export function DownloadLink({
  projectId,
  runId,
  artifact,
  compact = false,
}: {
  projectId: number;
  runId: number;
  artifact: RunArtifact;
  compact?: boolean;
}) {
  const address = useArtifactAddress(projectId, runId);
  return (
    <a
      href={address.href(artifact.name)}
      download={address.fileName(artifact.name)}
      className="rounded text-sm font-bold text-teal underline-offset-4 hover:underline"
    >
      {compact ? (
        <>
          Download <span className="sr-only">{artifact.name} </span>
          <span className="font-normal text-ink-soft">({formatBytes(artifact.size)})</span>
        </>
      ) : (
        artifact.name
      )}
    </a>
  );
}
