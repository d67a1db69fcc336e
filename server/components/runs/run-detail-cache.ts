/**
 * The large JSON columns (convergence, metrics, plots) of finished runs as the text they are stored as,
 * joined into `"convergence":…,"metrics":…,"plots":…`, by run id. A finished run's detail is read on every view
 * of its page: this spares reading, parsing and writing out again some 50 kB of JSON each time.
 * An entry is used only while the row's `updated_at` is the one it was read at (a write from another process
 * shows within a second, the column's resolution) and is dropped at once by every write of the run through
 * RunModel in this process (`watchRunDetailWrites`).
 */
import type { Model } from 'sequelize';
import { RunModel } from './run.model';

const KEPT = 200;
const entries = new Map<number, { stamp: number; text: string }>();

export function keptLargeColumns(runId: number, stamp: number): string | null {
  const entry = entries.get(runId);
  return entry && entry.stamp === stamp ? entry.text : null;
}

export function keepLargeColumns(runId: number, stamp: number, text: string) {
  entries.delete(runId);
  entries.set(runId, { stamp, text });
  if (entries.size > KEPT) entries.delete(entries.keys().next().value!);
}

/** Drops the entry of every run a write touches (all of them when the write names no single run). Call after the models' `init`. */
export function watchRunDetailWrites() {
  const forget = (where: unknown) => {
    const id = (where as { id?: unknown } | undefined)?.id;
    if (typeof id === 'number') entries.delete(id);
    else entries.clear();
  };
  const drop = (instance: Model) => {
    entries.delete((instance as RunModel).id);
  };
  RunModel.addHook('afterSave', drop);
  RunModel.addHook('afterDestroy', drop);
  RunModel.addHook('afterBulkUpdate', (options: { where?: unknown }) => forget(options.where));
  RunModel.addHook('afterBulkDestroy', (options: { where?: unknown }) => forget(options.where));
}
