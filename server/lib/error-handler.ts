import type { ErrorRequestHandler, RequestHandler } from 'express';
import { UniqueConstraintError, ValidationError } from 'sequelize';
import type { Logger } from 'pino';
import { AppError } from './app-error';

interface HttpLikeError {
  type?: string;
  status?: number;
  statusCode?: number;
  code?: string;
  expose?: boolean;
  message?: string;
  limit?: number;
}

export const apiNotFound: RequestHandler = (req, _res, next) => {
  next(new AppError(404, `No API route ${req.method} ${req.path}`));
};

/** The one error middleware: known errors become 4xx JSON; anything else is logged and answered generically. */
export function errorHandler(logger: Logger): ErrorRequestHandler {
  return (err: unknown, req, res, _next) => {
    const { status, body } = describe(err);
    if (status >= 500) logger.error({ err, method: req.method, url: req.originalUrl }, 'request failed');
    if (res.headersSent) return res.end();
    res.status(status).json(body);
  };
}

function describe(err: unknown): { status: number; body: { error: string; details?: Record<string, string> } } {
  if (err instanceof AppError) return { status: err.status, body: { error: err.message, details: err.details } };
  if (err instanceof UniqueConstraintError) {
    return { status: 409, body: { error: 'This already exists', details: fieldMessages(err) } };
  }
  if (err instanceof ValidationError) {
    return { status: 400, body: { error: `Invalid data — ${err.errors.map((e) => e.message).join('; ')}`, details: fieldMessages(err) } };
  }
  const e = (err ?? {}) as HttpLikeError;
  switch (e.type) {
    case 'entity.parse.failed':
      return { status: 400, body: { error: 'The request body is not valid JSON' } };
    case 'entity.too.large':
      return { status: 413, body: { error: `The request body is too large (limit ${e.limit ?? 'exceeded'} bytes)` } };
    case 'encoding.unsupported':
    case 'charset.unsupported':
      return { status: 415, body: { error: 'Send the body as UTF-8 JSON' } };
  }
  if (e.code === 'EBADCSRFTOKEN' || e.message === 'invalid csrf token') {
    return { status: 403, body: { error: 'Missing or stale CSRF token — reload the page and try again' } };
  }
  const status = e.status ?? e.statusCode;
  if (status && status >= 400 && status < 500 && e.expose !== false) {
    return { status, body: { error: e.message || 'Bad request' } };
  }
  return { status: 500, body: { error: 'Something went wrong on our side; it has been logged' } };
}

function fieldMessages(err: ValidationError): Record<string, string> {
  const out: Record<string, string> = {};
  for (const item of err.errors) if (item.path) out[item.path] ??= item.message;
  return out;
}
