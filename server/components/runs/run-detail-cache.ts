/**
 * The whole detail (RunDetail) of finished runs as JSON text, and the `{"run":…}` answer of the run route as
 * bytes, by run id. A finished run's detail is read on every view of its page: this spares three queries and
 * reading, parsing and writing out again some 50 kB of JSON each time.
 * An entry answers only for the project its run belongs to, and only while the row's `updated_at` is the one it
 * was read at, checked by one small query at most once per ACCESS_CACHE_SECONDS (in between, the entry is used
 * as it is); a run with no entry is read at once, with no check. An entry is dropped at once by every write in
 * this process of the run, of its events or files, or of any account (the detail names who started the run),
 * and by every change of the run another process announces (`forgetRunDetail`); so the wait only bounds how
 * long a change made by hand in the database goes unseen.
 */
import type { Model, Transaction } from 'sequelize';
import type { AppConfig } from '../../config';
import { UserModel } from '../users/user.model';
import { RunArtifactModel, RunEventModel, RunModel } from './run.model';

const KEPT = 200;
let checkEveryMs = 0;

/** How long an entry is used without checking its stamp again (ACCESS_CACHE_SECONDS; 0: checked every time). */
export function configureRunDetailCache(config: Pick<AppConfig, 'ACCESS_CACHE_SECONDS'>) {
  checkEveryMs = config.ACCESS_CACHE_SECONDS * 1000;
  entries.clear();
}

/** A kept detail: its JSON text, and the run route's answer made from it on first use (`runAnswerOf`). */
export interface KeptRunDetail {
  readonly text: string;
  answer?: Buffer;
}

interface Entry extends KeptRunDetail {
  projectId: number;
  stamp: number;
  /** When the stamp was last found current (ms). */
  checkedAt: number;
}
const entries = new Map<number, Entry>();

/**
 * The kept detail of finished run `runId` of project `projectId`, or null (not kept: read it from the database).
 * Used as it is while its stamp was found current within ACCESS_CACHE_SECONDS; otherwise `currentStamp` (the
 * row's `updated_at`, ms, or null when there is no such row) is asked first and must still equal it.
 */
export async function keptRunDetail(projectId: number, runId: number, currentStamp: () => Promise<number | null>): Promise<KeptRunDetail | null> {
  const entry = entries.get(runId);
  if (!entry || entry.projectId !== projectId) return null;
  if (Date.now() - entry.checkedAt < checkEveryMs) return entry;
  const stamp = await currentStamp();
  // A write meanwhile has dropped or replaced the entry.
  if (entries.get(runId) !== entry || stamp !== entry.stamp) return null;
  entry.checkedAt = Date.now();
  return entry;
}

/** The run route's answer, `{"run":…}` as UTF-8 bytes, of a kept detail (made on first use). */
export function runAnswerOf(kept: KeptRunDetail): Buffer {
  kept.answer ??= Buffer.from(`{"run":${kept.text}}`);
  return kept.answer;
}

/** Writes seen so far (of any run): a detail read while one happened is not kept. */
let writes = 0;

/** The count to pass to `keepRunDetail`, taken before the detail's reads begin. */
export function runDetailWrites(): number {
  return writes;
}

/** Keeps a finished run's detail read at `stamp`, unless a write was seen since `writesBefore` (runDetailWrites). */
export function keepRunDetail(projectId: number, runId: number, stamp: number, text: string, writesBefore: number) {
  if (writes !== writesBefore) return;
  entries.delete(runId);
  entries.set(runId, { projectId, stamp, checkedAt: Date.now(), text });
  if (entries.size > KEPT) entries.delete(entries.keys().next().value!);
}

/** Drops the run's entry: another process announced a change of the run. */
export function forgetRunDetail(runId: number) {
  writes += 1;
  entries.delete(runId);
}

type WriteOptions = { where?: unknown; transaction?: Transaction | null } | undefined;

/**
 * Drops the entry of every run a write touches (all of them when the write names no single run), right after
 * the write and again when its transaction commits. Call after the models' `init`.
 */
export function watchRunDetailWrites() {
  const drop = (id: unknown) => {
    writes += 1;
    if (typeof id === 'number') entries.delete(id);
    else entries.clear();
  };
  const dropNowAndAtCommit = (id: unknown, options: WriteOptions) => {
    drop(id);
    options?.transaction?.afterCommit(() => drop(id));
  };
  const idIn = (options: WriteOptions, key: 'id' | 'runId') => (options?.where as Record<string, unknown> | undefined)?.[key];
  const runIdOf = (row: Model) => (row as unknown as { runId: number }).runId;
  RunModel.addHook('afterSave', (run: Model, options: WriteOptions) => dropNowAndAtCommit((run as RunModel).id, options));
  RunModel.addHook('afterDestroy', (run: Model, options: WriteOptions) => dropNowAndAtCommit((run as RunModel).id, options));
  RunModel.addHook('afterBulkUpdate', (options: WriteOptions) => dropNowAndAtCommit(idIn(options, 'id'), options));
  RunModel.addHook('afterBulkDestroy', (options: WriteOptions) => dropNowAndAtCommit(idIn(options, 'id'), options));
  for (const model of [RunEventModel, RunArtifactModel] as unknown as (typeof RunEventModel)[]) {
    model.addHook('afterSave', (row: Model, options: WriteOptions) => dropNowAndAtCommit(runIdOf(row), options));
    model.addHook('afterBulkCreate', (_rows: Model[], options: WriteOptions) => dropNowAndAtCommit(null, options));
    model.addHook('afterBulkUpdate', (options: WriteOptions) => dropNowAndAtCommit(idIn(options, 'runId'), options));
    model.addHook('afterBulkDestroy', (options: WriteOptions) => dropNowAndAtCommit(idIn(options, 'runId'), options));
  }
  UserModel.addHook('afterSave', (_user: Model, options: WriteOptions) => dropNowAndAtCommit(null, options));
  UserModel.addHook('afterBulkUpdate', (options: WriteOptions) => dropNowAndAtCommit(null, options));
}
