import connectSessionSequelize from 'connect-session-sequelize';
import session from 'express-session';
import { Op, type Sequelize } from 'sequelize';
import { sessionRows } from './access-cache';
import { SessionModel } from './session.model';

const SequelizeStore = connectSessionSequelize(session.Store);

/** Sessions whose last expiry write is remembered; past this many, the oldest entries are dropped. */
const REMEMBERED_WRITES = 10_000;

export interface SessionStoreOptions {
  /** A session unused this long ends (SESSION_IDLE_HOURS): each row's stored expiry is its last use plus this. */
  idleMs: number;
  /** Least time between two writes of one session's sliding expiry (SESSION_TOUCH_SECONDS); 0 writes on every request. */
  touchIntervalMs: number;
}

/**
 * Browser sessions in the `sessions` table. connect-session-sequelize sweeps expired rows every 15 minutes;
 * reads and writes are ours:
 * - a row's stored expiry is the session's last use plus the idle lifetime (not the cookie's expiry, which is
 *   the absolute end, SESSION_MAX_DAYS after sign-in), and a session whose stored expiry has passed is not
 *   found, so it ends then rather than at the next sweep;
 * - the sliding expiry is written at most once per `touchIntervalMs` for each session instead of on every
 *   request (express-session touches the store on each one): the idle lifetime then ends up to
 *   `touchIntervalMs` earlier than it would, and a signed-in reader costs no database write per request;
 * - a session's row is read through the access cache (`sessionRows`, ACCESS_CACHE_SECONDS), which every write
 *   of a session row in this process empties, so a signed-in reader costs no database read for it either.
 */
export function createSessionStore(sequelize: Sequelize, options: SessionStoreOptions) {
  const { idleMs, touchIntervalMs } = options;
  const store = new SequelizeStore({ db: sequelize, table: 'Session', checkExpirationInterval: 15 * 60_000 });
  // Kept in write order (oldest first), so trimming stops at the first entry it must keep.
  const writtenAt = new Map<string, number>();
  const remember = (sid: string, now: number) => {
    writtenAt.delete(sid);
    writtenAt.set(sid, now);
    if (writtenAt.size <= REMEMBERED_WRITES) return;
    for (const [key, at] of writtenAt) {
      if (writtenAt.size <= REMEMBERED_WRITES && now - at < touchIntervalMs) break;
      writtenAt.delete(key);
    }
  };
  const done = (promise: Promise<unknown>, sid: string, callback?: (err?: unknown) => void) =>
    promise.then(
      () => callback?.(),
      (err: unknown) => {
        writtenAt.delete(sid);
        callback?.(err);
      },
    );

  const load = async (sid: string) => {
    const row = (await SessionModel.findOne({ where: { sid, expires: { [Op.gt]: new Date() } }, attributes: ['data', 'expires'], raw: true })) as unknown as {
      data: string;
      expires: Date;
    } | null;
    return row ? { data: row.data, expires: row.expires.getTime() } : null;
  };
  store.get = (sid, callback) => {
    sessionRows.get(sid, () => load(sid)).then(
      (row) => callback(null, row && row.expires > Date.now() ? JSON.parse(row.data) : null),
      (err: unknown) => callback(err),
    );
  };

  store.set = (sid, data, callback) => {
    const now = Date.now();
    remember(sid, now);
    void done(SessionModel.upsert({ sid, data: JSON.stringify(data), expires: new Date(now + idleMs) }), sid, callback);
  };

  store.touch = (sid, _data, callback) => {
    const now = Date.now();
    const last = writtenAt.get(sid);
    if (last !== undefined && now - last < touchIntervalMs) return callback?.(null);
    remember(sid, now);
    void done(SessionModel.update({ expires: new Date(now + idleMs) }, { where: { sid } }), sid, callback);
  };

  store.destroy = (sid, callback) => {
    writtenAt.delete(sid);
    void done(SessionModel.destroy({ where: { sid } }), sid, callback);
  };
  return store;
}
