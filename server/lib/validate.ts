import type { z } from 'zod';
import { AppError } from './app-error';

/** Parses `data` with a shared zod schema; on failure throws a 400 naming every bad field. */
export function parseInput<S extends z.ZodType>(schema: S, data: unknown, where = 'body'): z.infer<S> {
  const result = schema.safeParse(data ?? {});
  if (result.success) return result.data;
  const details: Record<string, string> = {};
  for (const issue of result.error.issues) {
    const key = issue.path.length ? issue.path.join('.') : where;
    details[key] ??= issue.message;
  }
  const summary = Object.entries(details)
    .map(([field, message]) => `${field}: ${message}`)
    .join('; ');
  throw new AppError(400, `Invalid ${where} — ${summary}`, details);
}

/** Parses a positive integer route parameter such as `:projectId`. */
export function parseId(value: unknown, name: string): number {
  const text = String(value ?? '');
  if (!/^[1-9][0-9]{0,9}$/.test(text)) throw new AppError(400, `${name} must be a positive whole number`);
  return Number(text);
}
