import { FINISHED_STATUSES, type RunStatus } from '@shared/schemas/runs';

export function isRunActive(status: RunStatus): boolean {
  return !FINISHED_STATUSES.includes(status);
}

/** Poll once a second while something is queued or running, not at all otherwise. */
export const ACTIVE_POLL_MS = 1000;
