/**
 * Who is asking and from where, for the security event log. The API sets it once per request, so a service
 * records an event with one line (`recordAudit(...)`) and never needs `req` for the address.
 */
import { AsyncLocalStorage } from 'node:async_hooks';
import type { NextFunction, Request, Response } from 'express';
import type { Logger } from 'pino';

export interface AuditScope {
  /** The signed-in account (session or access token) when the request arrived. */
  actorId: number | null;
  address: string | null;
  logger: Logger;
}

export const auditScope = new AsyncLocalStorage<AuditScope>();

/** `::ffff:127.0.0.1` → `127.0.0.1`; other addresses as they are. */
function clientAddress(ip: string | undefined): string | null {
  if (!ip) return null;
  return ip.startsWith('::ffff:') && ip.includes('.') ? ip.slice(7) : ip;
}

/** Middleware: runs the rest of the request inside its audit scope. `logger` is read per request. */
export function withAuditScope(logger: () => Logger) {
  return (req: Request, _res: Response, next: NextFunction) => {
    auditScope.run({ actorId: req.user?.id ?? null, address: clientAddress(req.ip), logger: logger() }, next);
  };
}
