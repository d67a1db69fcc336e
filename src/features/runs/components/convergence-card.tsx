import type { RunDetail } from '@shared/schemas/runs';
import { Card } from '@/components/ui/card';
import { MathText } from '@/components/ui/math-text';
import { isRunActive } from '@/features/runs/api/run-status';
import type { ChannelKey } from '@/features/runs/components/artifact-groups';
import { ConvergenceChart } from '@/features/runs/components/run-charts';

interface ConvergenceCardProps {
  run: RunDetail;
  channelNames: Record<ChannelKey, string>;
}

function describe(name: string, values: (number | null)[]): string {
  const finite = values.filter((v): v is number => typeof v === 'number' && Number.isFinite(v));
  const count = `${values.length} ${values.length === 1 ? 'iteration' : 'iterations'}`;
  if (finite.length === 0) return `${name}: ${count}`;
  return `${name}: ${count}, error ${finite[0].toExponential(2)} → ${finite[finite.length - 1].toExponential(2)}`;
}

/** Gerchberg–Saxton error per iteration for both hologram channels, growing live while the run retrieves. */
export function ConvergenceCard({ run, channelNames }: ConvergenceCardProps) {
  const series = (['a', 'b'] as const)
    .filter((key) => run.convergence[key].length > 0)
    .map((key) => ({ key, name: channelNames[key], values: run.convergence[key] }));
  const active = isRunActive(run.status);
  if (series.length === 0 && !active) return null;
  return (
    <Card
      title="Gerchberg–Saxton convergence"
      description={
        <>
          Fienup’s error over the whole far-field plane per iteration, on a log scale:{' '}
          <MathText text="$E_k = \sqrt{Σ (|G_k| − T)² / Σ T²}$" />, the target T being zero outside the window
          {active ? '; the curve grows while the run works' : ''}. Every bit of light outside the window counts
          against it, so weighted Gerchberg–Saxton and MRAF level off high on this measure by design: weighted GS
          re-weights the target each iteration towards even brightness in the window rather than towards the lowest
          whole-plane error, and MRAF sets the window to m × the target and leaves the rest of the light outside it. How
          well the picture itself is matched is the retrieval error in the window, under Metrics.
        </>
      }
    >
      {series.length === 0 ? (
        <p className="text-sm text-ink-soft">
          {run.status === 'queued'
            ? 'The curve appears once the run starts retrieving the phases.'
            : 'No iterations reported yet. Channels without an image hologram have nothing to retrieve.'}
        </p>
      ) : (
        <>
          <div role="img" aria-label={`Convergence plot. ${series.map((s) => describe(s.name, s.values)).join('. ')}.`}>
            <ConvergenceChart series={series} />
          </div>
          <ul className="mt-2 flex flex-col gap-0.5 text-xs text-ink-soft">
            {series.map((s) => (
              <li key={s.key}>{describe(s.name, s.values)}</li>
            ))}
          </ul>
        </>
      )}
    </Card>
  );
}
