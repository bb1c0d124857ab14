import { Passport, type PassportStatic } from 'passport';

export type CristaePassport = InstanceType<PassportStatic['Passport']>;
import { Strategy as LocalStrategy } from 'passport-local';
import { findSessionUser } from '../modules/users/users.repository';
import { checkCredentials } from './sign-in';

/** A passport instance per app, so tests with several apps never share strategies. */
export function createPassport(): CristaePassport {
  const passport = new Passport();
  passport.use(
    new LocalStrategy({ usernameField: 'email', passwordField: 'password' }, (email, password, done) => {
      checkCredentials(email, password).then(
        (user) => done(null, user),
        (err: unknown) => done(err),
      );
    }),
  );
  passport.serializeUser((user, done) => done(null, user.id));
  passport.deserializeUser((id: number, done) => {
    findSessionUser(id).then(
      // A deactivated account loses its sessions at the next request.
      (u) => done(null, u ?? false),
      (err: unknown) => done(err),
    );
  });
  return passport;
}
