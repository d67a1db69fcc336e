import type { Request } from 'express';
import { ipKeyGenerator, rateLimit } from 'express-rate-limit';
import type { AppConfig } from '../../config';
import { AppError } from '../../lib/app-error';

type LimitConfig = Pick<AppConfig, 'SIGNIN_LIMIT' | 'SIGNIN_WINDOW_MINUTES'>;
const limiters = new WeakMap<LimitConfig, ReturnType<typeof rateLimit>>();

/**
 * Wrong current passwords (password change, access-token creation) per account, SIGNIN_LIMIT per
 * SIGNIN_WINDOW_MINUTES like sign-in: someone at an unattended signed-in browser must not be able to guess
 * the password there. One count per app (its config), whichever route checked.
 */
export function currentPasswordLimiter(config: LimitConfig) {
  let limiter = limiters.get(config);
  if (!limiter) {
    limiter = createLimiter(config);
    limiters.set(config, limiter);
  }
  return limiter;
}

function createLimiter(config: LimitConfig) {
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
