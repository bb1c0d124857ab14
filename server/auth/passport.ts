import type { Express, RequestHandler } from 'express';
import { Passport, type PassportStatic } from 'passport';
import type { Sequelize } from 'sequelize';

export type CristaePassport = InstanceType<PassportStatic['Passport']>;
import { Strategy as LocalStrategy } from 'passport-local';
import type { SessionUser } from '@/schemas/user';
import { findSessionAccount } from '../modules/users/users.repository';
import { checkCredentials, type SignedInAccount } from './sign-in';

/** What the session stores: the account and the session generation it was opened under. */
type StoredLogin = { id: number; gen: number };

// The generation travels beside the user object handed to req.login, never inside it (req.user is sent as JSON).
const generations = new WeakMap<object, number>();

/** The user object to hand to req.login for an account checked at this generation. */
export function loginUser(account: SignedInAccount): SessionUser {
  const user = { ...account.user };
  generations.set(user, account.generation);
  return user;
}

function readStored(stored: unknown): StoredLogin | null {
  // Sessions opened before generations existed stored the bare id; they belong to generation 0.
  if (typeof stored === 'number') return { id: stored, gen: 0 };
  const s = stored as Partial<StoredLogin> | null;
  return s && typeof s.id === 'number' && typeof s.gen === 'number' ? { id: s.id, gen: s.gen } : null;
}

/** The account id a stored session belongs to, or null (used to end every session of one account). */
export function storedLoginUserId(stored: unknown): number | null {
  return readStored(stored)?.id ?? null;
}

/** A passport instance per app, so tests with several apps never share strategies. */
export function createPassport(sequelize: Sequelize): CristaePassport {
  const passport = new Passport();
  passport.use(
    new LocalStrategy({ usernameField: 'email', passwordField: 'password' }, (email, password, done) => {
      checkCredentials(sequelize, email, password).then(
        (account) => done(null, loginUser(account)),
        (err: unknown) => done(err),
      );
    }),
  );
  passport.serializeUser((user, done) => {
    const gen = generations.get(user);
    if (gen === undefined) return done(new Error('A session can only be opened for a checked account'));
    done(null, { id: user.id, gen } satisfies StoredLogin);
  });
  passport.deserializeUser((stored: unknown, done) => {
    deserialize(stored).then(
      (user) => done(null, user),
      (err: unknown) => done(err),
    );
  });
  return passport;
}

/** The signed-in user a stored login stands for, or false when that login has ended. */
async function deserialize(stored: unknown): Promise<SessionUser | false> {
  const login = readStored(stored);
  if (!login) return false;
  const a = await findSessionAccount(login.id);
  // A deactivated account, or a password changed or reset since this session opened, ends the session.
  return a && a.generation === login.gen ? a.user : false;
}

/**
 * What `passport.initialize()` and `passport.session()` do for every request, done with less work: the
 * request helpers initialize() copies onto each request (req.login, req.logout, req.isAuthenticated, the
 * session manager) are put once on the app's request prototype, which every request inherits from, by running
 * initialize() against it; and the session's stored login is turned into req.user the way passport's session
 * strategy does it (a login that has ended is removed from the session and the request goes on signed out),
 * without building a strategy object per request.
 */
export function sessionUsers(app: Express, passport: CristaePassport): RequestHandler {
  passport.initialize()(app.request, {} as never, () => undefined);
  return (req, _res, next) => {
    if (!req.session) return next(new Error('Login sessions require session support'));
    const login = (req.session as { passport?: { user?: unknown } }).passport;
    const stored = login?.user;
    if (!stored && stored !== 0) return next();
    deserialize(stored).then(
      (user) => {
        if (user) req.user = user;
        else delete login!.user;
        next();
      },
      (err: unknown) => next(err),
    );
  };
}
