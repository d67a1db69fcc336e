import { useEffect, useId, useSyncExternalStore } from 'react';
import { PICTURE_CONVENTION, pictureFramesSchema, type PictureFrame, type PictureFrames } from '@shared/schemas/pictures';
import type { RunDetail } from '@shared/schemas/runs';
import { Banner } from '@/components/ui/banner';
import { isRunActive } from '@/features/runs/api/run-status';

/**
 * How the run's pictures are shown (README "Picture convention"): each preview's frame, from the run's
 * `plots.pictures`, and the mirror switch — display only — that shows the previews as seen looking along
 * the light instead of facing the device. Kept in a small store so every figure of the page reads it
 * without threading props; the switch is remembered in this browser.
 */
const MIRROR_KEY = 'phasewright.pictures.mirrored';
const frames = new Map<number, PictureFrames | null>();
const listeners = new Set<() => void>();
let mirrored = readMirrored();

function readMirrored(): boolean {
  try {
    return typeof localStorage !== 'undefined' && localStorage.getItem(MIRROR_KEY) === '1';
  } catch {
    return false;
  }
}

function emit() {
  for (const listener of listeners) listener();
}

function subscribe(listener: () => void) {
  listeners.add(listener);
  return () => listeners.delete(listener);
}

function setMirrored(next: boolean) {
  mirrored = next;
  try {
    localStorage.setItem(MIRROR_KEY, next ? '1' : '0');
  } catch {
    // Private windows may refuse storage: the switch still works for this page.
  }
  emit();
}

/** The picture record of a run: its frames when it was made in the current convention, null for older runs. */
export function readPictureFrames(plots: RunDetail['plots']): PictureFrames | null {
  const parsed = pictureFramesSchema.safeParse((plots as Record<string, unknown> | null)?.pictures);
  return parsed.success ? parsed.data : null;
}

/** The frame of one of a run's pictures and whether previews are shown mirrored (only pictures with a frame are). */
export function usePictureFrame(runId: number, name: string): { frame: PictureFrame | undefined; mirrored: boolean } {
  const record = useSyncExternalStore(subscribe, () => frames.get(runId) ?? null);
  const flipped = useSyncExternalStore(subscribe, () => mirrored);
  const frame = record?.frames[name];
  return { frame, mirrored: frame ? flipped : false };
}

/**
 * Registers the frames of a run's previews, so that every ArtifactFigure of that run draws its axes (any page
 * that shows a run's pictures calls it, or renders RunPictureView). Returns the record, null for older runs.
 */
export function useRunPictureFrames(run: Pick<RunDetail, 'id' | 'plots'>): PictureFrames | null {
  const record = readPictureFrames(run.plots);
  // Registered while rendering (an idempotent cache write) so the figures rendered after it see the frames at once.
  if (JSON.stringify(frames.get(run.id) ?? null) !== JSON.stringify(record)) frames.set(run.id, record);
  useEffect(() => emit(), [run.id, record?.convention]);
  return record;
}

/**
 * The run's picture settings: registers the frames of its previews for the figures below, offers the
 * mirror switch, and says when the run was made before the current picture convention.
 */
export function RunPictureView({ run }: { run: RunDetail }) {
  const record = useRunPictureFrames(run);
  const flipped = useSyncExternalStore(subscribe, () => mirrored);
  const id = useId();
  // Files and plots are stored together when a run succeeds: while it is still running, nothing to say yet.
  const hasPreviews = run.artifacts.some((artifact) => artifact.name.endsWith('.png'));
  if (!hasPreviews || isRunActive(run.status)) return null;

  if (!record || record.convention < PICTURE_CONVENTION) {
    return (
      <Banner tone="warning" title="Previews in the earlier picture frame">
        This run was made before pictures followed one frame (x to the right, y up, seen facing the device from the
        side the light goes to). Its previews show v = sin θy, and y, growing downwards, and its target pictures were
        placed with their top row at the most negative v: the device of this run projects its pictures upside down in
        that frame, although the previews here show them upright. Run the revision again to place them upright and get
        previews with labelled axes.
      </Banner>
    );
  }
  return (
    <div className="flex flex-wrap items-center gap-x-4 gap-y-1 rounded-xl bg-paper-deep px-4 py-2 text-sm ring-1 ring-line ring-inset">
      <label htmlFor={id} className="inline-flex items-center gap-2 font-bold">
        <input id={id} type="checkbox" checked={flipped} onChange={(event) => setMirrored(event.target.checked)} className="size-4 accent-teal" />
        Mirror previews left–right
      </label>
      <span className="text-ink-soft">
        {flipped
          ? 'Shown as seen looking along the light, e.g. on a wall from behind the device: x (u) grows to the left. Files are unchanged.'
          : 'Shown facing the device from the side the light goes to: x (u) to the right, y (v) up; target pictures upright.'}
      </span>
    </div>
  );
}
