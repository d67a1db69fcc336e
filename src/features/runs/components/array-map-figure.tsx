import { useEffect, useState, type ReactNode } from 'react';
import type { RunArtifact } from '@shared/schemas/runs';
import { Banner } from '@/components/ui/banner';
import { Button } from '@/components/ui/button';
import { Spinner } from '@/components/ui/spinner';
import { ZoomPanImage } from '@/components/ui/zoom-pan-image';
import { useArrayPicture } from '@/features/runs/api/get-array-picture';
import { DownloadLink } from '@/features/runs/components/artifact-figure';
import { formatBytes } from '@/features/runs/components/artifact-groups';
import { usePictureFrame } from '@/features/runs/components/picture-view';

/** Arrays up to this size are drawn at once; larger ones wait for a click. */
const AUTO_BYTES = 2 * 1024 * 1024;

interface ArrayMapFigureProps {
  projectId: number;
  runId: number;
  artifact: RunArtifact;
  title: string;
  children?: ReactNode;
}

/** A map the run keeps only as a .npy array, drawn here in the cyclic phase colours. */
export function ArrayMapFigure({ projectId, runId, artifact, title, children }: ArrayMapFigureProps) {
  const [wanted, setWanted] = useState(artifact.size <= AUTO_BYTES);
  const view = usePictureFrame(runId, artifact.name);
  // Runs with a picture frame are drawn y up like their PNG previews; older runs as their previews were (row 0 on top).
  const picture = useArrayPicture(projectId, runId, artifact.name, wanted, view.frame !== undefined);
  const [url, setUrl] = useState<string | null>(null);

  useEffect(() => {
    if (!picture.data) return;
    const next = URL.createObjectURL(picture.data);
    setUrl(next);
    return () => URL.revokeObjectURL(next);
  }, [picture.data]);

  return (
    <figure className="flex min-w-0 flex-col gap-2">
      <figcaption className="flex flex-wrap items-baseline justify-between gap-x-3 gap-y-1">
        <span className="font-extrabold">{title}</span>
        <DownloadLink projectId={projectId} runId={runId} artifact={artifact} compact />
      </figcaption>
      <p className="-mt-1 text-sm text-ink-soft">Drawn in your browser from {artifact.name}.</p>
      {!wanted ? (
        <div className="flex aspect-square w-full flex-col items-center justify-center gap-3 rounded-xl bg-paper-deep p-6 text-center ring-1 ring-line">
          <p className="text-sm text-ink-soft">This array is {formatBytes(artifact.size)}; it is drawn only when you ask.</p>
          <Button variant="secondary" size="sm" onClick={() => setWanted(true)}>
            Draw {title}
          </Button>
        </div>
      ) : picture.isError ? (
        <Banner>{picture.error.message}</Banner>
      ) : url ? (
        <ZoomPanImage src={url} alt={title} axes={view.frame} mirrored={view.mirrored} />
      ) : (
        <div role="status" className="flex aspect-square w-full items-center justify-center gap-2 rounded-xl bg-paper-deep text-sm text-ink-soft ring-1 ring-line">
          <Spinner className="size-5 text-ember" />
          Drawing {title}…
        </div>
      )}
      {children}
    </figure>
  );
}
