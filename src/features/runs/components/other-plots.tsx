import type { RunArtifact } from '@shared/schemas/runs';
import { Card } from '@/components/ui/card';
import type { PictureAnnotation } from '@/components/ui/zoom-pan-image';
import { ArtifactFigure } from '@/features/runs/components/artifact-figure';
import { HistogramChart, ProfileChart } from '@/features/runs/components/run-charts';
import { humanize } from '@/features/runs/components/format-run';
import type { Histogram, RadialProfile } from '@/features/runs/components/run-plots';

interface OtherPlotsProps {
  projectId: number;
  runId: number;
  images: RunArtifact[];
  histograms: Histogram[];
  profiles: RadialProfile[];
  /** Extra marks and controls for one picture, by artifact name. */
  annotate?: (artifactName: string) => PictureAnnotation | undefined;
}

const titleOfSource = (source: string) => source.split(' › ').map(humanize).join(' › ') || 'Plot';

/** Pictures and plot data the page has no dedicated place for, shown rather than hidden. */
export function OtherPlots({ projectId, runId, images, histograms, profiles, annotate }: OtherPlotsProps) {
  if (images.length + histograms.length + profiles.length === 0) return null;
  return (
    <Card title="More results" description="Further pictures and plots this run produced.">
      <div className="grid gap-8 md:grid-cols-2">
        {histograms.map((histogram) => (
          <figure key={histogram.source} className="min-w-0">
            <figcaption className="mb-2 font-extrabold">{titleOfSource(histogram.source)}</figcaption>
            <div role="img" aria-label={`${titleOfSource(histogram.source)}: ${histogram.values.length} bars`}>
              <HistogramChart histogram={histogram} />
            </div>
          </figure>
        ))}
        {profiles.map((profile) => (
          <figure key={profile.source} className="min-w-0">
            <figcaption className="mb-2 font-extrabold">{titleOfSource(profile.source)}</figcaption>
            <div role="img" aria-label={`Radial profile ${titleOfSource(profile.source)}`}>
              <ProfileChart profile={profile} charge={null} markers={[]} />
            </div>
          </figure>
        ))}
        {images.map((artifact) => (
          <ArtifactFigure
            key={artifact.name}
            projectId={projectId}
            runId={runId}
            artifact={artifact}
            title={artifact.label || artifact.name}
            annotation={annotate?.(artifact.name)}
          />
        ))}
      </div>
    </Card>
  );
}
