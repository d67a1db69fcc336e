import { Router, type Request, type RequestHandler } from 'express';
import { ipKeyGenerator, rateLimit } from 'express-rate-limit';
import type { PassportStatic } from 'passport';
import {
  acceptInvitationSchema,
  changePasswordSchema,
  resetPasswordSchema,
  resetRequestSchema,
  signInSchema,
  signUpSchema,
  updateProfileSchema,
} from '../../../shared/schemas/auth';
import type { AppContext } from '../../context';
import { AppError } from '../../lib/app-error';
import { parseInput } from '../../lib/validate';
import { recordAudit, recordLockout, recordSignInFailure } from '../audit/audit.service';
import { toUserDto, updateProfile } from '../users/user.service';
import type { UserModel } from '../users/user.model';
import { currentUser, requireUser } from './auth.middleware';
import { acceptInvitation, requestPasswordReset, resetPassword, signUp } from './auth.service';
import { changePassword } from './credentials.service';

type CsrfTokenFn = (req: Request, overwrite?: boolean) => string;

/** Rate-limit key: the caller's address (IPv6 folded to its /56) together with the account e-mail. */
function perAccount(req: Request): string {
  return `${ipKeyGenerator(req.ip ?? '')}|${String(req.body?.email ?? '').trim().toLowerCase()}`;
}

/** Rate-limit key: the caller's address alone (IPv6 folded to its /56), whatever e-mails it tries. */
function perAddress(req: Request): string {
  return ipKeyGenerator(req.ip ?? '');
}

function tooMany(message: string) {
  return async (req: Request, _res: unknown, next: (err: AppError) => void) => {
    const usage = (req as Request & { rateLimit?: { used: number; limit: number } }).rateLimit;
    await recordLockout(req.path, String(req.body?.email ?? '').trim().toLowerCase(), usage);
    next(new AppError(429, message));
  };
}

/** `passwordChecks` limits wrong current passwords (shared with access-token creation). */
export function authRoutes(ctx: AppContext, passport: PassportStatic, csrfToken: CsrfTokenFn, passwordChecks: RequestHandler) {
  const router = Router();
  const windowMs = ctx.config.SIGNIN_WINDOW_MINUTES * 60_000;
  const signInLimiter = rateLimit({
    windowMs,
    limit: ctx.config.SIGNIN_LIMIT,
    skipSuccessfulRequests: true,
    standardHeaders: 'draft-8',
    legacyHeaders: false,
    keyGenerator: perAccount,
    handler: tooMany(`Too many failed sign-in attempts — wait ${ctx.config.SIGNIN_WINDOW_MINUTES} minutes and try again`),
  });
  // Password spraying: few tries on each of many accounts from one address.
  const signInAddressLimiter = rateLimit({
    windowMs,
    limit: ctx.config.SIGNIN_ADDRESS_LIMIT,
    skipSuccessfulRequests: true,
    standardHeaders: false,
    legacyHeaders: false,
    keyGenerator: perAddress,
    handler: tooMany(`Too many failed sign-in attempts from your network address — wait ${ctx.config.SIGNIN_WINDOW_MINUTES} minutes and try again`),
  });
  const resetMailLimiter = rateLimit({
    windowMs,
    limit: ctx.config.SIGNIN_LIMIT,
    standardHeaders: 'draft-8',
    legacyHeaders: false,
    keyGenerator: perAccount,
    handler: tooMany('Too many requests for links by e-mail (sign-up or password reset) — wait a while and try again'),
  });

  const signInAs = (req: Request, user: UserModel) =>
    new Promise<void>((resolve, reject) => req.login(user, (err) => (err ? reject(err) : resolve())));
  const signedIn = async (req: Request, user: UserModel) => {
    await signInAs(req, user);
    user.lastSignInAt = new Date();
    await user.save();
    return { user: toUserDto(user), csrfToken: csrfToken(req, true) };
  };

  router.get('/csrf', (req, res) => {
    res.json({ csrfToken: csrfToken(req) });
  });

  router.get('/me', (req, res) => {
    // The server's own upload limits (UPLOAD_MAX_MIB, UPLOAD_MAX_SIDE) and run memory budget (RUN_MEMORY_BUDGET_MB), so the client checks and shows these, not defaults.
    const limits = {
      uploadMaxBytes: Math.floor(ctx.config.UPLOAD_MAX_MIB * 1024 * 1024),
      uploadMaxSide: ctx.config.UPLOAD_MAX_SIDE,
      runMemoryBudgetMb: ctx.config.RUN_MEMORY_BUDGET_MB,
    };
    res.json({ user: req.user ? toUserDto(req.user) : null, signupOpen: ctx.config.ALLOW_SIGNUP, limits });
  });

  router.post('/sign-in', signInAddressLimiter, signInLimiter, async (req, res) => {
    const { email } = parseInput(signInSchema, req.body);
    const user = await new Promise<UserModel | false>((resolve, reject) =>
      passport.authenticate('local', { session: false }, (err: Error | null, found: UserModel | false) =>
        err ? reject(err) : resolve(found),
      )(req, res, () => undefined),
    );
    if (!user) await recordSignInFailure(email);
    if (!user) throw new AppError(401, 'E-mail or password is not correct, or the account is disabled');
    await recordAudit('sign-in', { actorId: user.id, subjectUserId: user.id });
    res.json(await signedIn(req, user));
  });

  router.post('/sign-out', (req, res, next) => {
    req.logout((err) => {
      if (err) return next(err);
      res.json({ ok: true, csrfToken: csrfToken(req, true) });
    });
  });

  router.post('/sign-up', resetMailLimiter, async (req, res) => {
    const input = parseInput(signUpSchema, req.body);
    await signUp(ctx, input);
    res.status(202).json({ message: `A link to finish creating the account is on its way to ${input.email}; it works for seven days` });
  });

  router.post('/password-reset/request', resetMailLimiter, async (req, res) => {
    const { email } = parseInput(resetRequestSchema, req.body);
    await requestPasswordReset(ctx, email);
    res.status(202).json({ message: 'If an account uses this e-mail, a reset link is on its way' });
  });

  router.post('/password-reset/complete', async (req, res) => {
    const { token, password } = parseInput(resetPasswordSchema, req.body);
    const { user, revokedTokens } = await resetPassword(ctx, token, password);
    res.json({ ...(await signedIn(req, user)), revokedTokens });
  });

  router.post('/invitation/accept', async (req, res) => {
    const { token, name, password } = parseInput(acceptInvitationSchema, req.body);
    const user = await acceptInvitation(ctx, token, name, password);
    res.json(await signedIn(req, user));
  });

  router.post('/password', requireUser, passwordChecks, async (req, res) => {
    const { currentPassword, newPassword } = parseInput(changePasswordSchema, req.body);
    const user = currentUser(req);
    const { revokedTokens } = await changePassword(user, currentPassword, newPassword, ctx.config.BCRYPT_COST);
    // Every other session of the account has ended; this one starts again under the new password.
    await signInAs(req, user);
    res.json({ ok: true, revokedTokens, csrfToken: csrfToken(req, true) });
  });

  router.patch('/profile', requireUser, async (req, res) => {
    const { name } = parseInput(updateProfileSchema, req.body);
    res.json({ user: await updateProfile(currentUser(req), name) });
  });

  return router;
}
