import { useCallback, useEffect, useId, useMemo, useRef, useState, type ReactNode } from 'react';
import { useSearchParams } from 'react-router-dom';
import type { PictureAnnotation } from '@/components/ui/zoom-pan-image';
import { useThreads } from '@/features/review/api/get-threads';
import type { MentionCandidate } from '@/features/review/components/comment-box';
import { NewThreadForm } from '@/features/review/components/new-thread-form';
import { PinLayer } from '@/features/review/components/pin-layer';
import { ThreadView, type ReviewViewer } from '@/features/review/components/thread-view';
import { pinPlace, type PinGrid, type RowDirection } from '@/features/review/utils/pin-place';

interface RunReviewOptions {
  projectId: number;
  runId: number;
  viewer: ReviewViewer;
  members: MentionCandidate[];
  /** The run's grid, to give pins their place in the picture's own coordinates. */
  grid?: PinGrid | null;
  /** Which way the run's previews run (pin-place.ts): +y up for runs in the current picture convention. */
  rows?: RowDirection;
}

/**
 * Review state of one run page: which picture takes a new pin, which thread is open, and the request to
 * bring a thread's picture into view (from the thread list or a `?thread=` link).
 */
export function useRunReview({ projectId, runId, viewer, members, grid = null, rows = 'top-is-positive' }: RunReviewOptions) {
  const threadsQuery = useThreads(projectId, runId);
  const threads = useMemo(() => [...(threadsQuery.data ?? [])].sort((a, b) => a.id - b.id), [threadsQuery.data]);
  const [commentingOn, setCommentingOn] = useState<string | null>(null);
  const [draft, setDraft] = useState<{ artifact: string; x: number; y: number } | null>(null);
  const [openThreadId, setOpenThreadId] = useState<number | null>(null);
  const [reveal, setReveal] = useState<{ artifact: string; threadId: number; nonce: number } | null>(null);
  const [searchParams] = useSearchParams();
  const linkedThread = Number(searchParams.get('thread')) || null;
  const handledLink = useRef<number | null>(null);

  const jumpTo = useCallback(
    (threadId: number) => {
      const thread = threads.find((t) => t.id === threadId);
      if (!thread) return;
      setOpenThreadId(threadId);
      setDraft(null);
      setReveal((current) => ({ artifact: thread.artifact, threadId, nonce: (current?.nonce ?? 0) + 1 }));
    },
    [threads],
  );

  useEffect(() => {
    if (linkedThread === null || handledLink.current === linkedThread) return;
    if (!threads.some((t) => t.id === linkedThread)) return;
    handledLink.current = linkedThread;
    jumpTo(linkedThread);
  }, [linkedThread, threads, jumpTo]);

  const numberOf = (threadId: number) => threads.findIndex((t) => t.id === threadId) + 1;

  const placeOf = (artifact: string, x: number, y: number) => pinPlace(artifact, x, y, grid, rows);

  const annotate = (artifact: string): PictureAnnotation => {
    const here = threads.filter((t) => t.artifact === artifact);
    const commenting = viewer.canComment && commentingOn === artifact;
    const openThread = here.find((t) => t.id === openThreadId);
    const draftHere = draft?.artifact === artifact ? draft : null;
    return {
      overlay: (layer) => (
        <PinLayer
          layer={layer}
          pins={here.map((t) => ({ id: t.id, number: numberOf(t.id), x: t.x, y: t.y, resolved: t.resolvedAt !== null, place: placeOf(artifact, t.x, t.y) }))}
          openId={openThread?.id ?? null}
          draft={draftHere}
          onOpen={(id) => {
            setDraft(null);
            setOpenThreadId((current) => (current === id ? null : id));
          }}
        />
      ),
      onPick: commenting
        ? (point) => {
            setOpenThreadId(null);
            setDraft({ artifact, ...point });
          }
        : undefined,
      controls: viewer.canComment ? (
        <button
          type="button"
          aria-pressed={commenting}
          onClick={() => {
            setCommentingOn(commenting ? null : artifact);
            if (commenting) setDraft(null);
          }}
          className={`rounded-full px-3 py-1 text-sm font-bold ring-1 ring-inset ${
            commenting ? 'bg-ink text-card ring-ink' : 'text-teal ring-line-strong hover:bg-paper-deep'
          }`}
        >
          Comment on this picture
        </button>
      ) : null,
      panel: (
        <>
          {commenting && !draftHere ? (
            <p className="text-sm font-semibold text-teal" role="status">
              Click the point of the picture your comment is about.
            </p>
          ) : null}
          {draftHere ? (
            <NewThreadForm
              projectId={projectId}
              runId={runId}
              artifact={artifact}
              point={draftHere}
              place={placeOf(artifact, draftHere.x, draftHere.y)}
              members={members}
              onCancel={() => setDraft(null)}
              onCreated={(threadId) => {
                setDraft(null);
                setCommentingOn(null);
                setOpenThreadId(threadId);
              }}
            />
          ) : null}
          {openThread ? (
            <RevealedThread
              key={openThread.id}
              revealNonce={reveal?.threadId === openThread.id ? reveal.nonce : 0}
              render={(headingId) => (
                <ThreadView
                  projectId={projectId}
                  runId={runId}
                  thread={openThread}
                  number={numberOf(openThread.id)}
                  viewer={viewer}
                  members={members}
                  headingId={headingId}
                  place={placeOf(artifact, openThread.x, openThread.y)}
                  onClose={() => setOpenThreadId(null)}
                />
              )}
            />
          ) : null}
        </>
      ),
    };
  };

  return { threads, threadsQuery, annotate, reveal, openThreadId, jumpTo, numberOf };
}

export type RunReview = ReturnType<typeof useRunReview>;

/** Scrolls the thread's pin into view and moves focus to the thread whenever a jump asks for it. */
function RevealedThread({ revealNonce, render }: { revealNonce: number; render: (headingId: string) => ReactNode }) {
  const headingId = useId();
  useEffect(() => {
    if (revealNonce === 0) return;
    const heading = document.getElementById(headingId);
    heading?.closest('figure')?.scrollIntoView({ block: 'start', behavior: 'smooth' });
    heading?.focus({ preventScroll: true });
  }, [revealNonce, headingId]);
  return <>{render(headingId)}</>;
}
