import type { RunArtifact, RunMetric } from '@shared/schemas/runs';
import { Card } from '@/components/ui/card';
import type { PictureAnnotation } from '@/components/ui/zoom-pan-image';
import type { ChannelKey, MapImage } from '@/features/runs/components/artifact-groups';
import { ArrayMapFigure } from '@/features/runs/components/array-map-figure';
import { ArtifactFigure } from '@/features/runs/components/artifact-figure';
import { CyclicLegend, SequentialLegend } from '@/features/runs/components/colour-legend';

interface MapPreviewsProps {
  projectId: number;
  runId: number;
  maps: MapImage[];
  arrayMaps: RunArtifact[];
  channelNames: Record<ChannelKey, string>;
  mapping: Record<string, RunMetric> | null;
  /** Extra marks and controls for one picture, by artifact name. */
  annotate?: (artifactName: string) => PictureAnnotation | undefined;
}

function titleOf(map: MapImage, channelNames: Record<ChannelKey, string>): string {
  const name = map.artifact.name.toLowerCase();
  switch (map.kind) {
    case 'phase':
      return `Phase φ of ${channelNames[map.channel!]}`;
    case 'cell-phase':
      return /y/.test(name.replace(/\.[^.]+$/, '').slice(-1)) ? 'Propagation phase δy' : 'Propagation phase δx';
    case 'rotation':
      return 'Pillar rotation θ';
    case 'index':
      return 'Atom index';
  }
}

function libraryCount(mapping: Record<string, RunMetric> | null): number | null {
  const match = /of (\d+) in the library/.exec(mapping?.distinctAtoms?.meaning ?? '');
  return match ? Number(match[1]) : null;
}

function legendOf(map: MapImage, mapping: Record<string, RunMetric> | null) {
  switch (map.kind) {
    case 'phase':
    case 'cell-phase':
      return <CyclicLegend title="Phase (rad)" />;
    case 'rotation':
      return (
        <CyclicLegend
          title="Rotation θ (rad)"
          ticks={['−π/2', '−π/4', '0', 'π/4', 'π/2']}
          note="θ repeats every π (a pillar turned by π is the same pillar), so 2θ is painted in the cyclic colours."
        />
      );
    case 'index': {
      const count = libraryCount(mapping);
      return (
        <SequentialLegend
          title="Atom (row of atoms.csv)"
          ticks={count ? ['0', String(Math.round((count - 1) / 2)), String(count - 1)] : ['first', 'last']}
          note="Each colour is one meta-atom of the library; the .npy array holds the exact index per cell."
        />
      );
    }
  }
}

/** Channel phases, the propagation phases δx/δy, the rotation θ and the atom-index map, each with its colour key. */
export function MapPreviews({ projectId, runId, maps, arrayMaps, channelNames, mapping, annotate }: MapPreviewsProps) {
  if (maps.length + arrayMaps.length === 0) return null;
  const phases = maps.filter((m) => m.kind === 'phase');
  const others = maps.filter((m) => m.kind !== 'phase');
  const figure = (map: MapImage) => (
    <ArtifactFigure
      key={map.artifact.name}
      projectId={projectId}
      runId={runId}
      artifact={map.artifact}
      title={titleOf(map, channelNames)}
      annotation={annotate?.(map.artifact.name)}
    >
      {legendOf(map, mapping)}
    </ArtifactFigure>
  );
  return (
    <Card
      title="Phase, cell and atom maps"
      description="One pixel per cell (large designs are sampled down for the picture; the .npy arrays keep every cell). Phases wrap at ±π."
    >
      <div className="grid gap-8 md:grid-cols-2">
        {phases.map(figure)}
        {arrayMaps.map((artifact) => {
          const title = /y$/i.test(artifact.name.replace(/\.npy$/i, '')) ? 'Propagation phase δy' : 'Propagation phase δx';
          return (
            <ArrayMapFigure key={artifact.name} projectId={projectId} runId={runId} artifact={artifact} title={title}>
              <CyclicLegend title="Phase (rad)" />
            </ArrayMapFigure>
          );
        })}
        {others.map(figure)}
      </div>
    </Card>
  );
}
