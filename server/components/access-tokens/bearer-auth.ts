import type { NextFunction, Request, Response } from 'express';
import type { TokenScope } from '../../../shared/schemas/access';
import { AppError } from '../../lib/app-error';
import { authenticateAccessToken } from './access-token.service';

declare module 'express-serve-static-core' {
  interface Request {
    /** Set when the request authenticated with `Authorization: Bearer <personal access token>`. */
    accessToken?: { id: number; scope: TokenScope };
  }
}

const SAFE_METHODS = new Set(['GET', 'HEAD', 'OPTIONS']);

/**
 * Authenticates `Authorization: Bearer <token>` requests as the token's owner, before every API route, so
 * the routes' own role checks apply unchanged. A read-only token may only read. Requests without the header
 * keep their session (or stay anonymous).
 */
export async function bearerAuth(req: Request, _res: Response, next: NextFunction) {
  const header = req.get('authorization');
  if (!header) return next();
  const match = /^Bearer\s+(\S+)\s*$/i.exec(header);
  if (!match) throw new AppError(401, 'Send the access token as "Authorization: Bearer <token>"');
  const { user, scope, tokenId } = await authenticateAccessToken(match[1]);
  req.user = user;
  req.accessToken = { id: tokenId, scope };
  if (scope === 'read' && !SAFE_METHODS.has(req.method)) {
    throw new AppError(403, `This access token has the read-only scope "read"; ${req.method} needs a token with the "write" scope`);
  }
  next();
}

/** A bearer request carries no cookie, so cross-site request forgery cannot ride on it: skip the CSRF check. */
export function unlessBearer(protection: (req: Request, res: Response, next: NextFunction) => void) {
  return (req: Request, res: Response, next: NextFunction) => (req.accessToken ? next() : protection(req, res, next));
}

/** Managing tokens needs a signed-in session: a leaked token must not be able to mint or list others. */
export function requireSession(req: Request, _res: Response, next: NextFunction) {
  if (!req.user) return next(new AppError(401, 'Sign in to continue'));
  if (req.accessToken) return next(new AppError(403, 'Access tokens are managed in Settings while signed in, not with an access token'));
  next();
}
