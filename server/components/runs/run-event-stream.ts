/**
 * Server-Sent Events of one run, with the limits a long-lived connection needs: at most
 * EVENT_STREAMS_PER_USER open at once per person (429 past it), and access checked again whenever a
 * membership is removed and every EVENT_STREAM_RECHECK_SECONDS, so a member removed from the project (or a
 * disabled account) stops receiving and the stream ends.
 */
import { EventEmitter } from 'node:events';
import type { Transaction } from 'sequelize';
import { FINISHED_STATUSES, type RunSummary } from '../../../shared/schemas/runs';
import type { AppContext } from '../../context';
import { AppError } from '../../lib/app-error';
import { MembershipModel } from '../projects/membership.model';
import { effectiveRole } from '../projects/project-access';
import { UserModel } from '../users/user.model';
import { getRunSummary } from './run.service';

/** Where a stream writes; the route adapts the HTTP response to it. */
export interface EventSink {
  send(event: string, data: unknown): void;
  comment(text: string): void;
  end(): void;
  onClose(listener: () => void): void;
}

/** Open streams per person, in this process. */
const openStreams = new Map<number, number>();

function reserve(ctx: AppContext, userId: number): () => void {
  const open = openStreams.get(userId) ?? 0;
  const limit = ctx.config.EVENT_STREAMS_PER_USER;
  if (open >= limit) {
    throw new AppError(429, `You already have ${open} run event streams open, the most one person may have at once (EVENT_STREAMS_PER_USER = ${limit}). Close a page or script that follows a run, then try again.`);
  }
  openStreams.set(userId, open + 1);
  let released = false;
  return () => {
    if (released) return;
    released = true;
    const left = (openStreams.get(userId) ?? 1) - 1;
    if (left > 0) openStreams.set(userId, left);
    else openStreams.delete(userId);
  };
}

/** Emits 'removed' once a removed membership is committed: every open stream then checks its access. */
const memberships = new EventEmitter().setMaxListeners(0);
const HOOK = 'run-event-streams';

/** (Re)attaches the hooks that announce removed memberships (a model's init drops earlier hooks). */
function watchMemberships() {
  const removed = () => {
    memberships.emit('removed');
  };
  const announce = (options: { transaction?: Transaction | null }) => {
    if (options.transaction) options.transaction.afterCommit(removed);
    else removed();
  };
  MembershipModel.removeHook('afterDestroy', HOOK);
  MembershipModel.removeHook('afterBulkDestroy', HOOK);
  MembershipModel.addHook('afterDestroy', HOOK, (_membership, options) => announce(options));
  MembershipModel.addHook('afterBulkDestroy', HOOK, (options) => announce(options));
}

/** Whether the person may still read the project: an enabled account with a role on it. */
async function stillAllowed(userId: number, projectId: number): Promise<boolean> {
  const user = await UserModel.findByPk(userId);
  if (!user || user.disabledAt) return false;
  return (await effectiveRole(user, projectId)) !== null;
}

/**
 * Checks the run exists and a stream slot is free (404 / 429 before anything is sent), then returns the
 * function that streams: an `update` event with the RunSummary whenever the row changes (at most every
 * 250 ms) and a final one when the run has finished; an `end` event when access was lost. Then the stream ends.
 */
export async function openRunEventStream(ctx: AppContext, projectId: number, runId: number, userId: number): Promise<(sink: EventSink) => void> {
  let summary: RunSummary = await getRunSummary(projectId, runId);
  const release = reserve(ctx, userId);
  watchMemberships();
  return (sink) => {
    sink.send('update', summary);
    if (FINISHED_STATUSES.includes(summary.status)) {
      release();
      return sink.end();
    }
    let timer: NodeJS.Timeout | null = null;
    let closed = false;
    const finish = () => {
      if (closed) return;
      closed = true;
      release();
      unsubscribe();
      clearInterval(keepAlive);
      clearInterval(recheck);
      memberships.off('removed', checkAccess);
      if (timer) clearTimeout(timer);
      sink.end();
    };
    const refresh = async () => {
      timer = null;
      if (closed) return;
      try {
        summary = await getRunSummary(projectId, runId);
      } catch {
        return finish();
      }
      if (closed) return;
      sink.send('update', summary);
      if (FINISHED_STATUSES.includes(summary.status)) finish();
    };
    const unsubscribe = ctx.runQueue.onUpdate((id) => {
      if (id === runId && !timer && !closed) timer = setTimeout(() => void refresh(), 250);
    });
    const keepAlive = setInterval(() => sink.comment('keep-alive'), 20_000);
    const checkAccess = () => {
      stillAllowed(userId, projectId)
        .then((allowed) => {
          if (allowed || closed) return;
          sink.send('end', { reason: 'You no longer have access to this project' });
          finish();
        })
        .catch((err: unknown) => ctx.logger.error({ err, runId }, 'event stream access check failed'));
    };
    const recheck = setInterval(checkAccess, ctx.config.EVENT_STREAM_RECHECK_SECONDS * 1000);
    memberships.on('removed', checkAccess);
    sink.onClose(finish);
  };
}
