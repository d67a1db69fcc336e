import { QueryTypes, type Sequelize } from 'sequelize';

let database: Sequelize | null = null;

/** Binds `select` to the connection pool; called once by createSequelize. */
export function bindSelect(sequelize: Sequelize) {
  database = sequelize;
}

/**
 * Rows of one SELECT written in SQL, with `?` placeholders filled from `params` by the driver: plain objects
 * with the columns as named (`AS`), dates as Date, JSON columns as their text. For reads on every page view
 * (lists, a run's detail), where building model instances and queries through the ORM costs several times
 * what the database does; everything else goes through the models.
 */
export function select<T extends object>(sql: string, params: readonly unknown[] = []): Promise<T[]> {
  if (!database) throw new Error('select() before createSequelize()');
  return database.query<T>(sql, { replacements: params as unknown[], type: QueryTypes.SELECT });
}

/** A JSON column's value as `select` returns it (text; a parsed value when the driver has parsed it already). */
export function jsonColumn<T>(value: unknown): T | null {
  if (value === null || value === undefined) return null;
  return (typeof value === 'string' ? JSON.parse(value) : value) as T;
}

/** A JSON column as JSON text, whether the driver hands it over as text or already parsed; `fallback` for NULL. */
export function jsonColumnText(value: unknown, fallback: string): string {
  if (value === null || value === undefined) return fallback;
  return typeof value === 'string' ? value : JSON.stringify(value);
}
