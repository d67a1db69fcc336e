import type { RunDetail } from '@shared/schemas/runs';
import { Card } from '@/components/ui/card';
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
        active
          ? 'Error per iteration of the phase retrieval, on a log scale; the curve grows while the run works.'
          : 'Error per iteration of the phase retrieval, on a log scale.'
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
