/**
 * The whole detail (RunDetail) of finished runs as JSON text, and the `{"run":…}` answer of the run route as
 * bytes, by run id. A finished run's detail is read on every view of its page: this spares three queries and
 * reading, parsing and writing out again some 50 kB of JSON each time; a request then costs one small query
 * (the run's status and `updated_at`, which also checks that the run belongs to the project).
 * An entry is used only while the row's `updated_at` is the one it was read at (a write from another process
 * shows within a second, the column's resolution), and is dropped at once by every write in this process of
 * the run, of its events or files, or of any account (the detail names who started the run).
 */
import type { Model } from 'sequelize';
import { UserModel } from '../users/user.model';
import { RunArtifactModel, RunEventModel, RunModel } from './run.model';

const KEPT = 200;
interface Entry {
  stamp: number;
  text: string;
  /** `{"run":text}` encoded, made on first use. */
  answer?: Buffer;
}
const entries = new Map<number, Entry>();

function kept(runId: number, stamp: number): Entry | null {
  const entry = entries.get(runId);
  return entry && entry.stamp === stamp ? entry : null;
}

/** The kept detail text of a finished run read at `stamp` (updated_at, ms), or null. */
export function keptRunDetail(runId: number, stamp: number): string | null {
  return kept(runId, stamp)?.text ?? null;
}

/** The run route's answer, `{"run":…}` as UTF-8 bytes, when the detail read at `stamp` is kept; else null. */
export function keptRunAnswer(runId: number, stamp: number): Buffer | null {
  const entry = kept(runId, stamp);
  if (!entry) return null;
  entry.answer ??= Buffer.from(`{"run":${entry.text}}`);
  return entry.answer;
}

export function keepRunDetail(runId: number, stamp: number, text: string) {
  entries.delete(runId);
  entries.set(runId, { stamp, text });
  if (entries.size > KEPT) entries.delete(entries.keys().next().value!);
}

/** Drops the entry of every run a write touches (all of them when the write names no single run). Call after the models' `init`. */
export function watchRunDetailWrites() {
  const forget = (where: unknown, key: 'id' | 'runId') => {
    const id = (where as Record<string, unknown> | undefined)?.[key];
    if (typeof id === 'number') entries.delete(id);
    else entries.clear();
  };
  RunModel.addHook('afterSave', (run: Model) => void entries.delete((run as RunModel).id));
  RunModel.addHook('afterDestroy', (run: Model) => void entries.delete((run as RunModel).id));
  RunModel.addHook('afterBulkUpdate', (options: { where?: unknown }) => forget(options.where, 'id'));
  RunModel.addHook('afterBulkDestroy', (options: { where?: unknown }) => forget(options.where, 'id'));
  for (const model of [RunEventModel, RunArtifactModel] as unknown as (typeof RunEventModel)[]) {
    model.addHook('afterSave', (row: Model) => void entries.delete((row as unknown as { runId: number }).runId));
    model.addHook('afterBulkCreate', () => entries.clear());
    model.addHook('afterBulkUpdate', (options: { where?: unknown }) => forget(options.where, 'runId'));
    model.addHook('afterBulkDestroy', (options: { where?: unknown }) => forget(options.where, 'runId'));
  }
  UserModel.addHook('afterSave', () => entries.clear());
  UserModel.addHook('afterBulkUpdate', () => entries.clear());
}
