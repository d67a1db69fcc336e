import { useState, type ReactNode } from 'react';
import type { RunDetail } from '@shared/schemas/runs';
import { Banner } from '@/components/ui/banner';
import { Button } from '@/components/ui/button';
import { ConfirmDialog } from '@/components/ui/confirm-dialog';
import { formatDateTime } from '@/lib/format';
import { useCancelRun } from '@/features/runs/api/cancel-run';
import { isRunActive } from '@/features/runs/api/run-status';
import { useStartRun } from '@/features/runs/api/start-run';
import { formatDb, formatDuration, formatPercent, STATUS_LABELS } from '@/features/runs/components/format-run';
import { RunProgress } from '@/features/runs/components/run-progress';
import { RunStatusBadge } from '@/features/runs/components/run-status-badge';
import { channelMetrics } from '@/features/runs/components/run-facts';

interface RunStatusPanelProps {
  projectId: number;
  run: RunDetail;
  canRun: boolean;
  onRestarted: (run: RunDetail) => void;
}

function Fact({ term, children }: { term: string; children: ReactNode }) {
  return (
    <div className="flex flex-col gap-0.5">
      <dt className="text-xs font-bold tracking-wide text-ink-soft uppercase">{term}</dt>
      <dd className="tabular-nums">{children}</dd>
    </div>
  );
}

function Headline({ label, value, note }: { label: string; value: string; note: string }) {
  return (
    <div className="rounded-2xl bg-paper px-4 py-3 ring-1 ring-line/70 ring-inset">
      <dt className="text-xs font-bold text-ink-soft">{label}</dt>
      <dd className="mt-0.5 text-2xl font-extrabold tabular-nums">{value}</dd>
      <dd className="mt-0.5 text-xs text-ink-soft">{note}</dd>
    </div>
  );
}

/** Which efficiency the headline shows for a channel: into the target window (holograms) or into the designed wavefront. */
export function efficiencyHeadline(run: Pick<RunDetail, 'metrics'>, channel: 'a' | 'b') {
  const window = channelMetrics(run.metrics, channel)?.efficiency !== undefined;
  const name = channel.toUpperCase();
  return window
    ? { label: `Window efficiency ${name}`, note: `power in channel ${name}'s target window / incident power` }
    : { label: `Wavefront efficiency ${name}`, note: `share of the incident power in channel ${name}'s designed wavefront` };
}

/** The run at a glance: status, stage, live percent, who and when, the headline figures, Cancel / Run again. */
export function RunStatusPanel({ projectId, run, canRun, onRestarted }: RunStatusPanelProps) {
  const [confirming, setConfirming] = useState(false);
  const cancel = useCancelRun(projectId, run.id);
  const restart = useStartRun(projectId);
  const active = isRunActive(run.status);
  const stage = run.status === 'queued' ? 'Waiting for a free worker' : active && run.stage ? run.stage.charAt(0).toUpperCase() + run.stage.slice(1) : '';

  return (
    <section aria-labelledby="run-status-heading" className="rounded-card bg-card p-6 shadow-card ring-1 ring-line/70">
      <div className="flex flex-wrap items-start justify-between gap-4">
        <div className="flex min-w-0 flex-col gap-2">
          <div className="flex flex-wrap items-center gap-3">
            <h2 id="run-status-heading" className="text-2xl font-extrabold tracking-tight">
              Run {run.id}
            </h2>
            <RunStatusBadge status={run.status} size="md" />
          </div>
          <p className="text-ink-soft">
            Revision {run.revisionNumber}
            {stage ? (
              <>
                {' · '}
                <span className="font-bold text-ink">{stage}</span>
              </>
            ) : null}
          </p>
        </div>
        <div className="flex flex-wrap gap-2">
          {canRun && active ? (
            <Button variant="danger" onClick={() => setConfirming(true)}>
              Cancel run
            </Button>
          ) : null}
          {canRun && !active ? (
            <Button
              variant="secondary"
              pending={restart.isPending}
              onClick={() => restart.mutate({ revisionNumber: run.revisionNumber }, { onSuccess: (data) => onRestarted(data.run) })}
            >
              Run revision {run.revisionNumber} again
            </Button>
          ) : null}
        </div>
      </div>
      {restart.error ? <Banner className="mt-4">{restart.error.message}</Banner> : null}

      <div className="mt-5">
        <RunProgress progress={run.progress} status={run.status} label="Run progress" size="lg" />
        <p className="sr-only" role="status" aria-live="polite">
          {`Run ${run.id}: ${STATUS_LABELS[run.status]}${run.stage && active ? `, ${run.stage}` : ''}`}
        </p>
      </div>

      {run.status === 'failed' ? (
        <Banner title="This run failed" className="mt-5">
          <p className="text-base">{run.error || 'The server stopped the run without giving a reason.'}</p>
          <p className="mt-1">
            {run.stage ? `It stopped during “${run.stage}”. ` : ''}
            {run.attempts > 1 ? `The server tried ${run.attempts} times. ` : ''}
            If the message names a design value, change it on the Design tab, save a new revision and run that one.
          </p>
        </Banner>
      ) : null}
      {run.status === 'cancelled' ? (
        <Banner tone="info" className="mt-5">
          This run was cancelled before it finished, so it has no previews or metrics. Files it had already written are
          listed below if there are any.
        </Banner>
      ) : null}

      <dl className="mt-5 grid grid-cols-2 gap-x-6 gap-y-3 text-sm sm:grid-cols-3 lg:grid-cols-5">
        <Fact term="Started by">{run.startedBy?.name ?? 'a former member'}</Fact>
        <Fact term="Queued">
          <time dateTime={run.queuedAt}>{formatDateTime(run.queuedAt)}</time>
        </Fact>
        <Fact term="Started">{run.startedAt ? <time dateTime={run.startedAt}>{formatDateTime(run.startedAt)}</time> : '—'}</Fact>
        <Fact term="Finished">{run.finishedAt ? <time dateTime={run.finishedAt}>{formatDateTime(run.finishedAt)}</time> : '—'}</Fact>
        <Fact term="Duration">{formatDuration(run.durationMs)}</Fact>
      </dl>

      {run.status === 'succeeded' ? (
        <dl className="mt-5 grid grid-cols-2 gap-3 lg:grid-cols-4" aria-label="Headline figures">
          <Headline {...efficiencyHeadline(run, 'a')} value={formatPercent(run.headline.efficiencyA)} />
          <Headline {...efficiencyHeadline(run, 'b')} value={formatPercent(run.headline.efficiencyB)} />
          <Headline label="Crosstalk, worse channel" value={formatDb(run.headline.crosstalkDb)} note="the higher of channels A and B, each in its own window" />
          <Headline label="Zero order, worse channel" value={formatPercent(run.headline.zeroOrder, 2)} note="the larger of channels A and B, each under its own input" />
        </dl>
      ) : null}

      <ConfirmDialog
        open={confirming}
        title={`Cancel run ${run.id}?`}
        confirmLabel="Cancel the run"
        pending={cancel.isPending}
        error={cancel.error?.message}
        onClose={() => {
          setConfirming(false);
          cancel.reset();
        }}
        onConfirm={() => cancel.mutate(undefined, { onSuccess: () => setConfirming(false) })}
      >
        The server stops the computation at its next check. Nothing of this run is kept for review; you can start the
        revision again later.
      </ConfirmDialog>
    </section>
  );
}
