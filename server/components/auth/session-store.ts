import connectSessionSequelize from 'connect-session-sequelize';
import session from 'express-session';
import { Op, type Sequelize } from 'sequelize';
import { sessionRows } from './access-cache';
import { SessionModel } from './session.model';

const SequelizeStore = connectSessionSequelize(session.Store);

/** Sessions whose last expiry write is remembered; past this many, the oldest entries are dropped. */
const REMEMBERED_WRITES = 10_000;

/**
 * Browser sessions in the `sessions` table (connect-session-sequelize), with two changes:
 * - a session whose stored expiry has passed is not found, so it ends at its expiry rather than at the next
 *   sweep of expired rows (every 15 minutes);
 * - the sliding expiry is written at most once per `touchIntervalMs` for each session instead of on every
 *   request (express-session touches the store on each one): the idle lifetime then ends up to
 *   `touchIntervalMs` earlier than it would, and a signed-in reader costs no database write per request.
 *   0 writes it on every request;
 * - a session's row is read through the access cache (`sessionRows`, ACCESS_CACHE_SECONDS), which every write
 *   of a session row in this process empties, so a signed-in reader costs no database read for it either.
 */
export function createSessionStore(sequelize: Sequelize, touchIntervalMs: number) {
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

  const touch = store.touch.bind(store);
  store.touch = (sid, data, callback) => {
    const now = Date.now();
    const last = writtenAt.get(sid);
    if (last !== undefined && now - last < touchIntervalMs) return callback?.(null);
    remember(sid, now);
    touch(sid, data, (err: unknown) => {
      if (err) writtenAt.delete(sid);
      callback?.(err);
    });
  };

  const set = store.set.bind(store);
  store.set = (sid, data, callback) => {
    remember(sid, Date.now());
    set(sid, data, (err?: unknown) => {
      if (err) writtenAt.delete(sid);
      callback?.(err);
    });
  };

  const destroy = store.destroy.bind(store);
  store.destroy = (sid, callback) => {
    writtenAt.delete(sid);
    destroy(sid, callback);
  };
  return store;
}
