import { useCreateThread } from '@/features/review/api/create-thread';
import { CommentBox, type MentionCandidate } from '@/features/review/components/comment-box';

interface NewThreadFormProps {
  projectId: number;
  runId: number;
  artifact: string;
  point: { x: number; y: number };
  /** The point in the picture's own coordinates, when it has them. */
  place?: string | null;
  members: MentionCandidate[];
  onCancel: () => void;
  onCreated: (threadId: number) => void;
}

/** The first comment of a new thread at the picked point. */
export function NewThreadForm({ projectId, runId, artifact, point, place, members, onCancel, onCreated }: NewThreadFormProps) {
  const create = useCreateThread(projectId, runId);
  return (
    <div className="rounded-xl bg-paper-deep/60 p-4 ring-1 ring-line">
      <p className="mb-2 text-xs text-ink-soft">
        New pin at {place ?? `${Math.round(point.x * 100)} % across, ${Math.round(point.y * 100)} % down`}. Click elsewhere on the picture to move it.
      </p>
      <CommentBox
        label="Comment"
        submitLabel="Post comment"
        members={members}
        autoFocus
        pending={create.isPending}
        error={create.isError ? create.error.message : null}
        onSubmit={async (body) => {
          const { thread } = await create.mutateAsync({ artifact, x: point.x, y: point.y, body });
          onCreated(thread.id);
        }}
        onCancel={onCancel}
      />
    </div>
  );
}
