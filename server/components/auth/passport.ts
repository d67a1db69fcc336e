import { Passport } from 'passport';
import { Strategy as LocalStrategy } from 'passport-local';
import { signInSchema } from '../../../shared/schemas/auth';
import type { AppConfig } from '../../config';
import { decoyHash, findSessionUser, verifyCredentials } from '../users/user.service';

const DAY_MS = 24 * 60 * 60 * 1000;

/** What a session stores of its user: the id and when they signed in (ms); older sessions stored the id alone. */
type SessionUser = { id: number; at: number } | number;

/**
 * A passport instance of this app alone (tests build several apps in one process). A session ends
 * SESSION_MAX_DAYS after sign-in however active it is, and when the account's password changes.
 */
export function createPassport(config: Pick<AppConfig, 'BCRYPT_COST' | 'SESSION_MAX_DAYS'>) {
  const passport = new Passport();
  decoyHash(config.BCRYPT_COST);
  passport.use(
    new LocalStrategy({ usernameField: 'email', passwordField: 'password' }, (email, password, done) => {
      const parsed = signInSchema.safeParse({ email, password });
      if (!parsed.success) return done(null, false);
      verifyCredentials(parsed.data.email, parsed.data.password, config.BCRYPT_COST).then(
        (user) => done(null, user ?? false),
        (err) => done(err),
      );
    }),
  );
  passport.serializeUser((user, done) => done(null, { id: (user as Express.User).id, at: Date.now() } satisfies SessionUser));
  passport.deserializeUser((stored: SessionUser, done) => {
    // A disabled or deleted account, an expired session or one from before a password change simply stops being signed in.
    const { id, at } = typeof stored === 'number' ? { id: stored, at: 0 } : stored;
    findSessionUser(id, at, config.SESSION_MAX_DAYS * DAY_MS).then((user) => done(null, user ?? false), done);
  });
  return passport;
}
