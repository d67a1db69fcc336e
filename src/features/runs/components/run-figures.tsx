import type { RunMetric } from '@shared/schemas/runs';
import type { PictureAnnotation } from '@/components/ui/zoom-pan-image';
import type { ArtifactGroups } from '@/features/runs/components/artifact-groups';
import { BeamChannel } from '@/features/runs/components/beam-channel';
import { MapPreviews } from '@/features/runs/components/map-previews';
import { OtherPlots } from '@/features/runs/components/other-plots';
import { RunSection } from '@/features/runs/components/run-section-index';
import type { channelLayout } from '@/features/runs/components/run-facts';
import type { RunPlots } from '@/features/runs/components/run-plots';

interface RunFiguresProps {
  projectId: number;
  runId: number;
  groups: ArtifactGroups;
  layout: ReturnType<typeof channelLayout>;
  plots: RunPlots;
  mapping: Record<string, RunMetric> | null;
  annotate?: (artifactName: string) => PictureAnnotation | undefined;
}

/** The figures below the far fields, on the run page and the shared page: beam channels, maps, other plots. */
export function RunFigures({ projectId, runId, groups, layout, plots, mapping, annotate }: RunFiguresProps) {
  const { channels, channelNames, beamChannels, profilesOf, linesOf, unplacedProfiles } = layout;
  return (
    <>
      <RunSection id="beams" className="flex flex-col gap-6">
      {beamChannels.map((c) => (
        <BeamChannel
          key={c}
          projectId={projectId}
          runId={runId}
          channel={channels[c]}
          slice={groups.slices[c]}
          profiles={profilesOf(c)}
          lines={linesOf(c)}
          annotate={annotate}
        />
      ))}
      </RunSection>

      <RunSection id="maps" className="flex flex-col gap-6">
      <MapPreviews
        projectId={projectId}
        runId={runId}
        maps={groups.maps}
        arrayMaps={groups.arrayMaps}
        channelNames={channelNames}
        mapping={mapping}
        annotate={annotate}
      />

      <OtherPlots
        projectId={projectId}
        runId={runId}
        images={[
          ...groups.otherImages,
          ...(['a', 'b'] as const).flatMap((c) => (groups.slices[c] && !beamChannels.includes(c) ? [groups.slices[c]!] : [])),
        ]}
        histograms={plots.histograms}
        profiles={unplacedProfiles}
        annotate={annotate}
      />
      </RunSection>
    </>
  );
}
