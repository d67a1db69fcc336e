/** The status history of a run: no "Running" on a step that is over. */
import { describe, expect, it } from 'vitest';
import { eventMarks } from '../../src/features/runs/components/event-steps';

describe('status history marks', () => {
  it('a finished run shows its steps as done and ends with its outcome', () => {
    const marks = eventMarks([{ status: 'queued' }, { status: 'running' }, { status: 'running' }, { status: 'running' }, { status: 'succeeded' }]);
    expect(marks).toEqual(['queued', 'done', 'done', 'done', 'succeeded']);
    expect(marks).not.toContain('running');
  });

  it('a run still computing shows "running" on its present step only', () => {
    expect(eventMarks([{ status: 'queued' }, { status: 'running' }, { status: 'running' }])).toEqual(['queued', 'done', 'running']);
  });

  it('a failed or cancelled run keeps its outcome, and its steps before it are done', () => {
    expect(eventMarks([{ status: 'queued' }, { status: 'running' }, { status: 'failed' }])).toEqual(['queued', 'done', 'failed']);
    expect(eventMarks([{ status: 'queued' }, { status: 'cancelled' }])).toEqual(['queued', 'cancelled']);
  });
});
