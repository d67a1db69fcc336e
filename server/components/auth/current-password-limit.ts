import type { Request, RequestHandler } from 'express';
import { ipKeyGenerator, rateLimit } from 'express-rate-limit';
import type { AppConfig } from '../../config';
import { AppError } from '../../lib/app-error';

/**
 * Wrong current passwords (password change, access-token creation) per account, SIGNIN_LIMIT per
 * SIGNIN_WINDOW_MINUTES like sign-in: someone at an unattended signed-in browser must not be able to guess
 * the password there. The app builds one and hands it to every route that checks, so they share one count.
 */
export function currentPasswordLimiter(config: Pick<AppConfig, 'SIGNIN_LIMIT' | 'SIGNIN_WINDOW_MINUTES'>): RequestHandler {
  return rateLimit({
    windowMs: config.SIGNIN_WINDOW_MINUTES * 60_000,
    limit: config.SIGNIN_LIMIT,
    skipSuccessfulRequests: true,
    standardHeaders: false,
    legacyHeaders: false,
    keyGenerator: (req: Request) => (req.user ? `user:${req.user.id}` : ipKeyGenerator(req.ip ?? '')),
    handler: (_req, _res, next) =>
      next(new AppError(429, `Too many wrong current passwords — wait ${config.SIGNIN_WINDOW_MINUTES} minutes and try again`)),
  });
}
