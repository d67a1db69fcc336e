import type { Model, ModelStatic, Transaction } from 'sequelize';

export interface ModelReadCacheOptions {
  /** How long an entry is used, ms; 0 turns the cache off (every `get` loads). */
  ttlMs: number;
  /** Entries kept at most; the oldest go first. */
  maxEntries: number;
}

interface Entry<V> {
  value: Promise<V>;
  at: number;
}

/**
 * Values read from the database on nearly every request (the signed-in account, a member's role on a
 * project), kept between requests and dropped, all at once, whenever a watched model is written through
 * Sequelize in this process — right after the write and again when its transaction commits, so no request
 * sees the old value once the write has returned. A load that was under way while a write happened is used
 * by its own request but not kept. `ttlMs` only bounds how long a change made outside this process (by hand
 * in the database) goes unseen. Values are plain data: callers build fresh model instances from them.
 */
export class ModelReadCache<V> {
  private readonly entries = new Map<string, Entry<V>>();
  private generation = 0;

  constructor(private options: ModelReadCacheOptions) {}

  configure(options: ModelReadCacheOptions) {
    this.options = options;
    this.clear();
  }

  async get(key: string, load: () => Promise<V>): Promise<V> {
    const { ttlMs, maxEntries } = this.options;
    if (ttlMs <= 0 || maxEntries <= 0) return load();
    const now = Date.now();
    const hit = this.entries.get(key);
    if (hit && now - hit.at < ttlMs) return hit.value;
    const generation = this.generation;
    const value = load();
    const entry: Entry<V> = { value, at: now };
    this.entries.delete(key);
    this.entries.set(key, entry);
    if (this.entries.size > maxEntries) this.entries.delete(this.entries.keys().next().value!);
    const forget = () => {
      if (this.entries.get(key) === entry) this.entries.delete(key);
    };
    value.then(() => {
      if (generation !== this.generation) forget();
    }, forget);
    return value;
  }

  clear() {
    this.generation += 1;
    this.entries.clear();
  }

  /**
   * Clears the cache on every write of `model` through Sequelize (instance saves and destroys, bulk
   * creates, updates and destroys, upserts). Call after the model's `init`, which drops its hooks.
   */
  watch(model: ModelStatic<Model>) {
    const cleared = (transaction: Transaction | null | undefined) => {
      this.clear();
      transaction?.afterCommit(() => this.clear());
    };
    type Options = { transaction?: Transaction | null } | undefined;
    model.addHook('afterSave', (_instance: Model, options: Options) => cleared(options?.transaction));
    model.addHook('afterDestroy', (_instance: Model, options: Options) => cleared(options?.transaction));
    model.addHook('afterBulkCreate', (_instances: Model[], options: Options) => cleared(options?.transaction));
    model.addHook('afterBulkUpdate', (options: Options) => cleared(options?.transaction));
    model.addHook('afterBulkDestroy', (options: Options) => cleared(options?.transaction));
    model.addHook('afterUpsert', (_result: unknown, options: Options) => cleared(options?.transaction));
  }
}
