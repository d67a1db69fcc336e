/**
 * What the status history shows beside each event: its status while that is still the run's present state,
 * "done" for a step of the run that a later event has followed (it ran, and is over). Only the last event of
 * a run still running says "Running".
 * Example: [queued, running "prepare", running "atom mapping", succeeded] → [queued, done, done, succeeded].
 */
export function eventMarks<S extends string>(events: { status: S }[]): (S | 'done')[] {
  return events.map((event, i) => (event.status === 'running' && i < events.length - 1 ? 'done' : event.status));
}
