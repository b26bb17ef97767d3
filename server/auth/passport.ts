/**
 * passport + passport-local. The session holds only the user's id and session epoch; the user,
 * and every membership, are read from the database on each request, so removing a user or
 * changing a password (which raises the epoch) ends their other sessions at once.
 */
import passport from 'passport';
import { Strategy as LocalStrategy } from 'passport-local';
import { Company, User } from '../models';
import { burnDummyVerify, verifyPassword } from './passwords';

export interface AuthUser {
  id: string;
  email: string;
  name: string;
  companyId: string;
  companyName: string;
  sessionEpoch: number;
}

declare global {
  // eslint-disable-next-line @typescript-eslint/no-namespace
  namespace Express {
    // eslint-disable-next-line @typescript-eslint/no-empty-object-type
    interface User extends AuthUser {}
  }
}

interface SessionRef {
  id: string;
  epoch: number;
}

async function loadUser(where: { id: string } | { email: string }): Promise<(User & { company?: Company }) | null> {
  return User.findOne({ where, include: [{ model: Company, as: 'company' }] }) as Promise<
    (User & { company?: Company }) | null
  >;
}

/** passport info.message code for a right password on an address not yet confirmed. */
export const UNCONFIRMED = 'email_unconfirmed';

/** The signed-in shape of a user, read fresh from the database (null when gone or disabled). */
export async function loadAuthUser(id: string): Promise<AuthUser | null> {
  const user = await loadUser({ id });
  return user && !user.disabledAt ? toAuthUser(user) : null;
}

function toAuthUser(user: User & { company?: Company }): AuthUser {
  return {
    id: user.id,
    email: user.email,
    name: user.name,
    companyId: user.companyId,
    companyName: user.company?.name ?? '',
    sessionEpoch: user.sessionEpoch,
  };
}

export function configurePassport(): passport.PassportStatic {
  const instance = new passport.Passport() as unknown as passport.PassportStatic;
  instance.use(
    new LocalStrategy({ usernameField: 'email', passwordField: 'password', session: true }, (email, password, done) => {
      (async () => {
        const user = await loadUser({ email: email.trim().toLowerCase() });
        if (!user || !user.passwordHash || user.disabledAt) {
          await burnDummyVerify(password);
          return done(null, false);
        }
        if (!(await verifyPassword(password, user.passwordHash))) return done(null, false);
        // Only now, with the password right, may the answer say the address is unconfirmed.
        if (!user.emailConfirmedAt) return done(null, false, { message: UNCONFIRMED });
        return done(null, toAuthUser(user));
      })().catch(done);
    }),
  );
  instance.serializeUser((user, done) => done(null, { id: user.id, epoch: user.sessionEpoch } satisfies SessionRef));
  instance.deserializeUser((ref: SessionRef, done) => {
    (async () => {
      if (!ref || typeof ref.id !== 'string') return done(null, false);
      const user = await loadUser({ id: ref.id });
      if (!user || user.disabledAt || user.sessionEpoch !== ref.epoch) return done(null, false);
      return done(null, toAuthUser(user));
    })().catch(done);
  });
  return instance;
}
