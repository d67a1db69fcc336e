import type { RunArtifact, RunMetric } from '@shared/schemas/runs';
import { Card } from '@/components/ui/card';
import type { PictureAnnotation } from '@/components/ui/zoom-pan-image';
import { ArtifactFigure } from '@/features/runs/components/artifact-figure';
import { MathText } from '@/components/ui/math-text';
import { formatMetricValue, metricName } from '@/features/runs/components/format-run';
import { LaserSafetyNote } from '@/features/runs/components/laser-safety-note';
import { AxialChart, ProfileChart } from '@/features/runs/components/run-charts';
import type { ChannelFacts } from '@/features/runs/components/run-facts';
import type { AxialLine, RadialProfile } from '@/features/runs/components/run-plots';
import { usePictureFrame } from '@/features/runs/components/picture-view';

interface BeamChannelProps {
  projectId: number;
  runId: number;
  channel: ChannelFacts;
  slice: RunArtifact | undefined;
  profiles: RadialProfile[];
  lines: AxialLine[];
  /** Extra marks and controls for one picture, by artifact name. */
  annotate?: (artifactName: string) => PictureAnnotation | undefined;
}

const BEAM_KEYS = [
  'sinBeta',
  'topologicalCharge',
  'coreRadiusMeasured',
  'coreRadiusFormula',
  'coreRadiusRelativeError',
  'ringRadiusMeasured',
  'ringRadiusFormula',
  'ringRadiusRelativeError',
  'nonDiffractingLengthMeasured',
  'nonDiffractingLengthFormula',
  'profileCorrelation',
  'focalLength',
  'numericalAperture',
  'focalSpotZeroMeasured',
  'focalSpotRadiusMeasured',
  'focalSpotZeroSquare',
  'focalSpotRadiusAiry',
  'strehlVsDesign',
];

function value(metrics: Record<string, RunMetric> | null, key: string): number | null {
  const v = metrics?.[key]?.value;
  return typeof v === 'number' && Number.isFinite(v) ? v : null;
}

/** A beam or lens channel: caution, x–z slice, radial profile against J_ℓ², intensity along z, key figures. */
export function BeamChannel({ projectId, runId, channel, slice, profiles, lines, annotate }: BeamChannelProps) {
  const metrics = channel.metrics;
  const figures = BEAM_KEYS.filter((key) => metrics?.[key]);
  const kind = channel.beam ? (channel.charge ? `vortex Bessel beam, ℓ = ${channel.charge}` : 'Bessel beam') : 'lens focus';
  const radiusMarkers: { radius: number; label: string }[] = [];
  const addRadius = (key: string, label: string) => {
    const v = value(metrics, key);
    if (v !== null) radiusMarkers.push({ radius: v, label });
  };
  addRadius('coreRadiusFormula', 'r₀ formula');
  addRadius('ringRadiusFormula', 'ring formula');
  addRadius('focalSpotZeroSquare', 'λf/D');
  addRadius('focalSpotZeroMeasured', 'first zero');
  addRadius('focalSpotRadiusAiry', 'Airy 0.61 λ/NA');
  const zMarkers: { z: number; label: string }[] = [];
  const measuredLength = value(metrics, 'nonDiffractingLengthMeasured');
  const formulaLength = value(metrics, 'nonDiffractingLengthFormula');
  if (formulaLength !== null) zMarkers.push({ z: formulaLength, label: 'R/tanβ' });
  if (measuredLength !== null) zMarkers.push({ z: measuredLength, label: 'measured' });

  return (
    <Card
      title={channel.name}
      description={`${kind.charAt(0).toUpperCase()}${kind.slice(1)}${channel.recipe ? ` · recipe: ${channel.recipe}` : ''}.`}
    >
      <LaserSafetyNote className="mb-5" />
      <div className="grid gap-8 xl:grid-cols-2">
        {slice ? (
          <ArtifactFigure
            projectId={projectId}
            runId={runId}
            artifact={slice}
            title="x–z intensity slice"
            aspect={0.66}
            annotation={annotate?.(slice.name)}
          >
            <SliceDirections runId={runId} name={slice.name} />
          </ArtifactFigure>
        ) : null}
        {figures.length > 0 ? (
          <div className="min-w-0">
            <h3 className="mb-2 font-extrabold">Key figures</h3>
            <dl className="divide-y divide-line/70 rounded-2xl ring-1 ring-line/70 ring-inset">
              {figures.map((key) => (
                <div key={key} className="grid grid-cols-[1fr_auto] items-baseline gap-x-4 gap-y-0.5 px-4 py-2.5">
                  <dt className="font-bold">{metricName(key)}</dt>
                  <dd className="font-bold tabular-nums">{formatMetricValue(metrics![key])}</dd>
                  <dd className="col-span-2 text-xs text-ink-soft">
                    <MathText text={metrics![key].meaning} />
                  </dd>
                </div>
              ))}
            </dl>
          </div>
        ) : null}
        {profiles.map((profile) => (
          <figure key={profile.source} className="min-w-0">
            <figcaption className="mb-2">
              <span className="font-extrabold">{channel.beam ? 'Transverse radial profile' : 'Focal spot along x'}</span>
              <span className="block text-sm text-ink-soft">
                {channel.beam ? 'Azimuthal mean of the simulated intensity' : 'Simulated intensity along x through the focal peak at z = f, sampled 40 times per λf/D'}
                {profile.z !== null ? ` at z = ${(profile.z * 1e6).toPrecision(4)} µm` : ''}
                {profile.analytic ? ', against the analytic Bessel curve scaled to it' : ''}.
              </span>
            </figcaption>
            <div role="img" aria-label={`Radial intensity profile of ${channel.name}${profile.analytic ? ' with the analytic J_ℓ² curve' : ''}`}>
              <ProfileChart profile={profile} charge={channel.beam ? channel.charge : null} markers={radiusMarkers} axisLabel={channel.beam ? undefined : 'distance x from the focal peak'} />
            </div>
          </figure>
        ))}
        {lines.map((line) => (
          <figure key={line.source} className="min-w-0">
            <figcaption className="mb-2">
              <span className="font-extrabold">Intensity along the beam</span>
              <span className="block text-sm text-ink-soft">
                {line.meaning ? `${line.meaning.charAt(0).toUpperCase()}${line.meaning.slice(1)}` : 'Intensity'} against distance
                from the device; the non-diffracting length is marked.
              </span>
            </figcaption>
            <div role="img" aria-label={`Intensity along z of ${channel.name}`}>
              <AxialChart line={line} markers={zMarkers} />
            </div>
          </figure>
        ))}
      </div>
    </Card>
  );
}

/** Which way the slice runs: x up in the picture convention, x downwards in runs made before it. */
function SliceDirections({ runId, name }: { runId: number; name: string }) {
  const { frame } = usePictureFrame(runId, name);
  return <p className="text-xs text-ink-soft">Propagation distance z runs to the right, x {frame ? 'upwards' : 'downwards'} through the beam axis.</p>;
}
