import { Passport } from 'passport';
import { Strategy as LocalStrategy } from 'passport-local';
import { signInSchema } from '../../../shared/schemas/auth';
import { findSignedInUser, verifyCredentials } from '../users/user.service';

/** A passport instance of this app alone (tests build several apps in one process). */
export function createPassport() {
  const passport = new Passport();
  passport.use(
    new LocalStrategy({ usernameField: 'email', passwordField: 'password' }, (email, password, done) => {
      const parsed = signInSchema.safeParse({ email, password });
      if (!parsed.success) return done(null, false);
      verifyCredentials(parsed.data.email, parsed.data.password).then(
        (user) => done(null, user ?? false),
        (err) => done(err),
      );
    }),
  );
  passport.serializeUser((user, done) => done(null, (user as Express.User).id));
  passport.deserializeUser((id: number, done) => {
    // A disabled or deleted account simply stops being signed in.
    findSignedInUser(id).then((user) => done(null, user ?? false), done);
  });
  return passport;
}
