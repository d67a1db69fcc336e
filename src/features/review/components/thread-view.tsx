import { useState } from 'react';
import type { ReviewComment, ReviewThread } from '@shared/schemas/review';
import { Badge } from '@/components/ui/badge';
import { Button } from '@/components/ui/button';
import { formatDateTime } from '@/lib/format';
import { useAddComment } from '@/features/review/api/add-comment';
import { useDeleteComment } from '@/features/review/api/delete-comment';
import { useEditComment } from '@/features/review/api/edit-comment';
import { useSetThreadResolved } from '@/features/review/api/set-thread-resolved';
import { CommentBox, type MentionCandidate } from '@/features/review/components/comment-box';
import { CommentText } from '@/features/review/components/comment-text';

export interface ReviewViewer {
  userId: number;
  canComment: boolean;
  canDeleteAny: boolean;
}

interface ThreadViewProps {
  projectId: number;
  runId: number;
  thread: ReviewThread;
  number: number;
  viewer: ReviewViewer;
  members: MentionCandidate[];
  headingId: string;
  /** Where the pin sits, in the picture's own coordinates, when it has them. */
  place?: string | null;
  onClose: () => void;
}

/** One pinned thread: its comments, a reply box, resolve or reopen, edit and delete of one's own comments. */
export function ThreadView({ projectId, runId, thread, number, viewer, members, headingId, place, onClose }: ThreadViewProps) {
  const reply = useAddComment(projectId, runId, thread.id);
  const resolve = useSetThreadResolved(projectId, runId, thread.id);
  const resolved = thread.resolvedAt !== null;

  return (
    <section aria-labelledby={headingId} className="rounded-xl bg-paper-deep/60 p-4 ring-1 ring-line">
      <div className="mb-3 flex flex-wrap items-center justify-between gap-2">
        <h3 id={headingId} tabIndex={-1} className="flex items-center gap-2 font-extrabold focus:outline-none">
          Thread {number}
          {resolved ? <Badge tone="teal">Resolved</Badge> : <Badge tone="ember">Open</Badge>}
        </h3>
        <div className="flex flex-wrap gap-2">
          {viewer.canComment ? (
            <Button variant="secondary" size="sm" pending={resolve.isPending} onClick={() => resolve.mutate(!resolved)}>
              {resolved ? 'Reopen thread' : 'Resolve thread'}
            </Button>
          ) : null}
          <Button variant="quiet" size="sm" onClick={onClose}>
            Close thread
          </Button>
        </div>
      </div>
      {place ? <p className="mb-2 text-xs text-ink-soft">Pinned at {place}</p> : null}
      {resolved && thread.resolvedBy ? (
        <p className="mb-3 text-xs text-ink-soft">
          Resolved by {thread.resolvedBy.name} on {formatDateTime(thread.resolvedAt!)}
        </p>
      ) : null}
      {resolve.isError ? <p className="mb-2 text-sm font-semibold text-danger">{resolve.error.message}</p> : null}
      <ol className="flex flex-col gap-3" aria-label={`Comments in thread ${number}`}>
        {thread.comments.map((comment) => (
          <CommentItem key={comment.id} projectId={projectId} runId={runId} comment={comment} viewer={viewer} members={members} />
        ))}
      </ol>
      {viewer.canComment ? (
        <div className="mt-4">
          <CommentBox
            label="Reply"
            submitLabel="Post reply"
            members={members}
            pending={reply.isPending}
            error={reply.isError ? reply.error.message : null}
            onSubmit={(body) => reply.mutateAsync(body)}
          />
        </div>
      ) : null}
    </section>
  );
}

function CommentItem({
  projectId,
  runId,
  comment,
  viewer,
  members,
}: {
  projectId: number;
  runId: number;
  comment: ReviewComment;
  viewer: ReviewViewer;
  members: MentionCandidate[];
}) {
  const [editing, setEditing] = useState(false);
  const [confirming, setConfirming] = useState(false);
  const edit = useEditComment(projectId, runId, comment.threadId);
  const remove = useDeleteComment(projectId, runId, comment.threadId);
  const own = comment.author?.id === viewer.userId;
  const canDelete = viewer.canComment && (own || viewer.canDeleteAny);

  return (
    <li className="rounded-lg bg-card p-3 ring-1 ring-line">
      <p className="mb-1 text-xs text-ink-soft">
        <span className="font-bold text-ink">{comment.author?.name ?? 'A former member'}</span> ·{' '}
        <time dateTime={comment.createdAt}>{formatDateTime(comment.createdAt)}</time>
        {comment.editedAt ? ' · edited' : ''}
      </p>
      {editing ? (
        <CommentBox
          label="Edit comment"
          submitLabel="Save comment"
          members={members}
          initial={comment.body}
          autoFocus
          pending={edit.isPending}
          error={edit.isError ? edit.error.message : null}
          onSubmit={async (body) => {
            await edit.mutateAsync({ commentId: comment.id, body });
            setEditing(false);
          }}
          onCancel={() => setEditing(false)}
        />
      ) : (
        <CommentText body={comment.body} members={members} />
      )}
      {!editing && (own || canDelete) && viewer.canComment ? (
        <div className="mt-2 flex flex-wrap items-center gap-2">
          {own ? (
            <Button variant="quiet" size="sm" onClick={() => setEditing(true)}>
              Edit<span className="sr-only"> comment</span>
            </Button>
          ) : null}
          {canDelete && !confirming ? (
            <Button variant="quiet" size="sm" onClick={() => setConfirming(true)}>
              Delete<span className="sr-only"> comment</span>
            </Button>
          ) : null}
          {confirming ? (
            <>
              <span className="text-sm">Delete this comment?</span>
              <Button variant="danger" size="sm" pending={remove.isPending} onClick={() => remove.mutate(comment.id)}>
                Delete comment
              </Button>
              <Button variant="quiet" size="sm" onClick={() => setConfirming(false)}>
                Keep it
              </Button>
            </>
          ) : null}
          {remove.isError ? <p className="text-sm font-semibold text-danger">{remove.error.message}</p> : null}
        </div>
      ) : null}
    </li>
  );
}
