import type { Model, ModelStatic, Transaction } from 'sequelize';

export interface ModelReadCacheOptions {
  /** How long an entry is used, ms; 0 turns the cache off (every `get` loads). */
  ttlMs: number;
  /** Entries kept at most; the oldest go first. */
  maxEntries: number;
  /**
   * With `sizeOf`: the values' total size kept at most (the oldest go first; a value larger than this alone is
   * used by its own request but not kept). Unbounded when omitted.
   */
  maxBytes?: number;
}

interface Entry<V> {
  value: Promise<V>;
  at: number;
  /** The value's size once loaded (0 until then). */
  bytes: number;
}

type WriteOptions = { transaction?: Transaction | null } | undefined;

/**
 * Values read from the database on nearly every request (the signed-in account, a member's role on a
 * project, the busiest lists' answers), kept between requests and dropped, all at once, whenever a watched
 * model is written through Sequelize in this process — right after the write and again when its transaction
 * commits, so no request sees the old value once the write has returned. A load that was under way while a
 * write happened is used by its own request but not kept. `ttlMs` only bounds how long a change made outside
 * this process (by hand in the database) goes unseen. Values are plain data: callers build fresh model
 * instances from them. `sizeOf` (e.g. a text's length) lets `maxBytes` bound the memory the entries hold.
 */
export class ModelReadCache<V> {
  private readonly entries = new Map<string, Entry<V>>();
  private generation = 0;
  private bytes = 0;

  constructor(
    private options: ModelReadCacheOptions,
    private readonly sizeOf?: (value: V) => number,
  ) {}

  configure(options: ModelReadCacheOptions) {
    this.options = options;
    this.clear();
  }

  /** Bytes the loaded entries hold (by `sizeOf`; 0 without it). */
  get heldBytes(): number {
    return this.bytes;
  }

  async get(key: string, load: () => Promise<V>): Promise<V> {
    const { ttlMs, maxEntries } = this.options;
    if (ttlMs <= 0 || maxEntries <= 0) return load();
    const now = Date.now();
    const hit = this.entries.get(key);
    if (hit && now - hit.at < ttlMs) return hit.value;
    const generation = this.generation;
    const value = load();
    const entry: Entry<V> = { value, at: now, bytes: 0 };
    this.remove(key);
    this.entries.set(key, entry);
    if (this.entries.size > maxEntries) this.remove(this.entries.keys().next().value!);
    value.then(
      (loaded) => {
        if (generation !== this.generation || this.entries.get(key) !== entry) return this.forget(key, entry);
        if (!this.sizeOf) return;
        entry.bytes = this.sizeOf(loaded);
        this.bytes += entry.bytes;
        this.trim(entry);
      },
      () => this.forget(key, entry),
    );
    return value;
  }

  clear() {
    this.generation += 1;
    this.entries.clear();
    this.bytes = 0;
  }

  /** A write the watched models' hooks cannot see (raw SQL): clears now and again when `transaction` commits. */
  changed(transaction?: Transaction | null) {
    this.clear();
    transaction?.afterCommit(() => this.clear());
  }

  /**
   * Clears the cache on every write of these models through Sequelize (instance saves and destroys, bulk
   * creates, updates and destroys, upserts). Call after the models' `init`, which drops their hooks.
   */
  watch(...models: ModelStatic<Model>[]) {
    for (const model of models) {
      model.addHook('afterSave', (_instance: Model, options: WriteOptions) => this.changed(options?.transaction));
      model.addHook('afterDestroy', (_instance: Model, options: WriteOptions) => this.changed(options?.transaction));
      model.addHook('afterBulkCreate', (_instances: Model[], options: WriteOptions) => this.changed(options?.transaction));
      model.addHook('afterBulkUpdate', (options: WriteOptions) => this.changed(options?.transaction));
      model.addHook('afterBulkDestroy', (options: WriteOptions) => this.changed(options?.transaction));
      model.addHook('afterUpsert', (_result: unknown, options: WriteOptions) => this.changed(options?.transaction));
    }
  }

  private remove(key: string) {
    const entry = this.entries.get(key);
    if (!entry) return;
    this.bytes -= entry.bytes;
    this.entries.delete(key);
  }

  private forget(key: string, entry: Entry<V>) {
    if (this.entries.get(key) === entry) this.remove(key);
  }

  /** Drops the oldest entries while the held bytes exceed `maxBytes` (`newest` last, when it alone is too large). */
  private trim(newest: Entry<V>) {
    const limit = this.options.maxBytes;
    if (limit === undefined) return;
    for (const [key, entry] of this.entries) {
      if (this.bytes <= limit) return;
      if (entry !== newest) this.remove(key);
    }
    if (this.bytes > limit) {
      for (const [key, entry] of this.entries) if (entry === newest) this.remove(key);
    }
  }
}
