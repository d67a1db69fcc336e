import { useState } from 'react';
import type { ReviewThread } from '@shared/schemas/review';
import { Card } from '@/components/ui/card';
import { Spinner } from '@/components/ui/spinner';
import { formatRelative } from '@/lib/format';

type StatusFilter = 'open' | 'resolved' | 'all';

interface ReviewThreadsCardProps {
  threads: ReviewThread[];
  loading: boolean;
  error: string | null;
  userId: number;
  openThreadId: number | null;
  numberOf: (threadId: number) => number;
  titleOf: (artifact: string) => string;
  onJump: (threadId: number) => void;
}

const STATUS_LABELS: Record<StatusFilter, string> = { open: 'Open', resolved: 'Resolved', all: 'All' };

/** Every thread of the run, filtered; choosing one brings its pin into view and opens it. */
export function ReviewThreadsCard({ threads, loading, error, userId, openThreadId, numberOf, titleOf, onJump }: ReviewThreadsCardProps) {
  const [status, setStatus] = useState<StatusFilter>('open');
  const [mine, setMine] = useState(false);
  const [mentioningMe, setMentioningMe] = useState(false);

  const shown = threads.filter(
    (t) =>
      (status === 'all' || (status === 'resolved') === (t.resolvedAt !== null)) &&
      (!mine || t.createdBy?.id === userId || t.comments.some((c) => c.author?.id === userId)) &&
      (!mentioningMe || t.comments.some((c) => c.mentions.includes(userId))),
  );

  return (
    <Card title="Review threads" description="Comments pinned on this run’s pictures." className="self-start xl:sticky xl:top-4">
      <div className="mb-4 flex flex-col gap-3">
        <div role="radiogroup" aria-label="Thread status" className="inline-flex w-fit gap-1 rounded-full bg-paper-deep p-1 ring-1 ring-line ring-inset">
          {(Object.keys(STATUS_LABELS) as StatusFilter[]).map((key) => (
            <label
              key={key}
              className={`cursor-pointer rounded-full px-3 py-1 text-sm font-bold has-[:focus-visible]:ring-2 has-[:focus-visible]:ring-teal ${
                status === key ? 'bg-ink text-card' : 'text-ink-soft hover:text-ink'
              }`}
            >
              <input type="radio" name="thread-status" className="sr-only" checked={status === key} onChange={() => setStatus(key)} />
              {STATUS_LABELS[key]}
            </label>
          ))}
        </div>
        <div className="flex flex-wrap gap-4 text-sm">
          <label className="flex items-center gap-2">
            <input type="checkbox" className="size-4 accent-teal" checked={mine} onChange={(e) => setMine(e.target.checked)} />
            Mine
          </label>
          <label className="flex items-center gap-2">
            <input type="checkbox" className="size-4 accent-teal" checked={mentioningMe} onChange={(e) => setMentioningMe(e.target.checked)} />
            Mentioning me
          </label>
        </div>
      </div>
      {loading ? (
        <Spinner />
      ) : error ? (
        <p className="text-sm font-semibold text-danger">The threads did not load: {error}</p>
      ) : shown.length === 0 ? (
        <p className="text-sm text-ink-soft">
          {threads.length === 0 ? 'No comments yet. Use “Comment on this picture” on a preview to start one.' : 'No thread matches these filters.'}
        </p>
      ) : (
        <ul className="flex flex-col gap-2" aria-label="Threads">
          {shown.map((t) => {
            const first = t.comments[0];
            return (
              <li key={t.id}>
                <button
                  type="button"
                  onClick={() => onJump(t.id)}
                  aria-current={t.id === openThreadId || undefined}
                  className={`w-full rounded-xl p-3 text-left ring-1 ring-inset hover:bg-paper-deep ${t.id === openThreadId ? 'ring-ember' : 'ring-line'}`}
                >
                  <span className="flex items-center justify-between gap-2 text-xs text-ink-soft">
                    <span className="font-extrabold text-ink">
                      Go to thread {numberOf(t.id)}
                      {t.resolvedAt ? ' · resolved' : ''}
                    </span>
                    <span>{formatRelative(t.comments.at(-1)?.createdAt ?? t.createdAt)}</span>
                  </span>
                  <span className="mt-1 block truncate text-xs text-ink-soft">{titleOf(t.artifact)}</span>
                  <span className="mt-1 line-clamp-2 block text-sm break-words text-ink">
                    {first ? `${first.author?.name ?? 'A former member'}: ${first.body}` : 'All comments were deleted'}
                  </span>
                  <span className="mt-1 block text-xs text-ink-soft">
                    {t.comments.length} comment{t.comments.length === 1 ? '' : 's'}
                  </span>
                </button>
              </li>
            );
          })}
        </ul>
      )}
    </Card>
  );
}
