/**
 * The whole detail (RunDetail) of finished runs as JSON text, and the `{"run":…}` answer of the run route as
 * bytes, by run id. A finished run's detail is read on every view of its page: this spares three queries and
 * reading, parsing and writing out again some 50 kB of JSON each time.
 * An entry is used only while the row's `updated_at` is the one it was read at, checked by one small query
 * (the run's status and `updated_at`, which also checks that the run belongs to the project) — at most once
 * per ACCESS_CACHE_SECONDS: in between, the entry is used as it is. It is dropped at once by every write in
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

interface Entry {
  projectId: number;
  stamp: number;
  /** When the stamp was last found current (ms). */
  checkedAt: number;
  text: string;
  /** `{"run":text}` encoded, made on first use. */
  answer?: Buffer;
}
const entries = new Map<number, Entry>();

function kept(runId: number, stamp: number): Entry | null {
  const entry = entries.get(runId);
  if (!entry || entry.stamp !== stamp) return null;
  entry.checkedAt = Date.now();
  return entry;
}

/** The kept entry of run `runId` of project `projectId` when its stamp was found current within ACCESS_CACHE_SECONDS, else null. */
function recent(projectId: number, runId: number): Entry | null {
  const entry = entries.get(runId);
  return entry && entry.projectId === projectId && Date.now() - entry.checkedAt < checkEveryMs ? entry : null;
}

/** The kept detail text of a finished run with no need to check its stamp now (see above), or null. */
export function recentRunDetail(projectId: number, runId: number): string | null {
  return recent(projectId, runId)?.text ?? null;
}

/** The run route's answer with no need to check the stamp now, or null. */
export function recentRunAnswer(projectId: number, runId: number): Buffer | null {
  const entry = recent(projectId, runId);
  return entry ? answerOf(entry) : null;
}

function answerOf(entry: Entry): Buffer {
  entry.answer ??= Buffer.from(`{"run":${entry.text}}`);
  return entry.answer;
}

/** The kept detail text of a finished run read at `stamp` (updated_at, ms), or null. */
export function keptRunDetail(runId: number, stamp: number): string | null {
  return kept(runId, stamp)?.text ?? null;
}

/** The run route's answer, `{"run":…}` as UTF-8 bytes, when the detail read at `stamp` is kept; else null. */
export function keptRunAnswer(runId: number, stamp: number): Buffer | null {
  const entry = kept(runId, stamp);
  return entry ? answerOf(entry) : null;
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
