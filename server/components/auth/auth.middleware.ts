import type { NextFunction, Request, Response } from 'express';
import { AppError } from '../../lib/app-error';

/** Rejects requests without a signed-in, enabled user (401). */
export function requireUser(req: Request, _res: Response, next: NextFunction) {
  if (!req.user) return next(new AppError(401, 'Sign in to continue'));
  next();
}

export function requireAdmin(req: Request, _res: Response, next: NextFunction) {
  if (!req.user) return next(new AppError(401, 'Sign in to continue'));
  if (req.user.siteRole !== 'admin') return next(new AppError(403, 'Only an admin can do this'));
  next();
}

export function currentUser(req: Request) {
  if (!req.user) throw new AppError(401, 'Sign in to continue');
  return req.user;
}
