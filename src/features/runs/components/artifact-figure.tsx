import type { ReactNode } from 'react';
import type { RunArtifact } from '@shared/schemas/runs';
import { ZoomPanImage, type PictureAnnotation } from '@/components/ui/zoom-pan-image';
import { useArtifactAddress } from '@/features/runs/api/artifact-url-context';
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
      <ZoomPanImage src={href} alt={`${title}${artifact.label && artifact.label !== title ? ` — ${artifact.label}` : ''}`} aspect={aspect}
        overlay={annotation?.overlay}
        onPick={annotation?.onPick}
        axes={view.frame}
        mirrored={view.mirrored}
      />
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
