import { Link } from 'react-router-dom';
import type { ActivityItem } from '@shared/schemas/review';
import { Card } from '@/components/ui/card';
import { Spinner } from '@/components/ui/spinner';
import { paths } from '@/config/paths';
import { formatDateTime, formatRelative } from '@/lib/format';
import { useActivity } from '@/features/projects/api/get-activity';

const SHOWN = 30;

function itemHref(projectId: number, item: ActivityItem): string | null {
  if (item.runId == null) return null;
  const run = paths.projects.run.getHref(projectId, item.runId);
  return item.threadId != null && item.kind === 'comment' ? `${run}?thread=${item.threadId}` : run;
}

/** What happened in the project lately — who did what, and when — newest first. */
export function ActivityCard({ projectId }: { projectId: number }) {
  const activity = useActivity(projectId);
  return (
    <Card title="Activity" description="Revisions, runs, comments, membership changes and fab package downloads, newest first.">
      {activity.isPending ? (
        <Spinner />
      ) : activity.isError ? (
        <p className="text-sm text-ink-soft">The activity could not be loaded. Reload the page to try again.</p>
      ) : activity.data.length === 0 ? (
        <p className="text-sm text-ink-soft">Nothing has happened here yet.</p>
      ) : (
        <ol className="flex flex-col divide-y divide-line" aria-label="Project activity">
          {activity.data.slice(0, SHOWN).map((item, index) => {
            const href = itemHref(projectId, item);
            return (
              <li key={`${item.kind}-${item.at}-${index}`} className="flex flex-wrap items-baseline justify-between gap-x-4 gap-y-1 py-2 text-sm">
                <span>
                  <span className="font-bold">{item.actor?.name ?? (item.kind.startsWith('run-') ? 'Phasewright' : 'A former member')}</span>{' '}
                  {href ? (
                    <Link to={href} className="rounded text-teal underline-offset-4 hover:underline">
                      {item.text}
                    </Link>
                  ) : (
                    item.text
                  )}
                </span>
                <time dateTime={item.at} title={formatDateTime(item.at)} className="text-ink-soft">
                  {formatRelative(item.at)}
                </time>
              </li>
            );
          })}
        </ol>
      )}
    </Card>
  );
}
