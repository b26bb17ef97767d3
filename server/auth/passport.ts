/**
 * passport + passport-local. The session holds only the user's id and session epoch; the user,
 * and every membership, are read from the database on each request (the user and the membership
 * of the job in the path in one query), so removing a user or
 * changing a password (which raises the epoch) ends their other sessions at once.
 */
import passport from 'passport';
import { Strategy as LocalStrategy } from 'passport-local';
import type { Request } from 'express';
import { Op, QueryTypes, type Sequelize } from 'sequelize';
import type { Role } from '../../shared/words';
import { AuthToken, Company, Job, User } from '../models';
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

/** Set while deserializing the user when the API path is /jobs/:jobId/...: the caller's membership of that job. */
export interface PreloadedMembership {
  jobId: string;
  /** null: not a member (or no such job). */
  role: Role | null;
  /** The company the caller acts for on this job (the membership's, not their home company). */
  companyId: string | null;
  job: Job | null;
}

declare global {
  // eslint-disable-next-line @typescript-eslint/no-namespace
  namespace Express {
    interface Request {
      preloadedMembership?: PreloadedMembership;
    }
  }
}

const JOB_PATH = /^\/jobs\/([0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12})(?:\/|$)/i;

const AUTH_SQL = `SELECT /* trimout:auth */ u.id, u.email, u.name, u.company_id, u.session_epoch, u.disabled_at, c.name AS company_name,
       m.role, m.company_id AS member_company_id, CASE WHEN j.id IS NULL THEN NULL ELSE to_jsonb(j) END AS job
  FROM users u
  LEFT JOIN companies c ON c.id = u.company_id
  LEFT JOIN job_members m ON m.user_id = u.id AND m.job_id = $2::uuid
  LEFT JOIN jobs j ON j.id = m.job_id
 WHERE u.id = $1::uuid`;

interface AuthRow {
  id: string;
  email: string;
  name: string;
  company_id: string;
  session_epoch: number;
  disabled_at: Date | null;
  company_name: string | null;
  role: Role | null;
  member_company_id: string | null;
  job: Record<string, unknown> | null;
}

/** A Job instance from to_jsonb(jobs row), as Sequelize would have built it from a SELECT. */
function jobFromRow(json: Record<string, unknown>): Job {
  const values: Record<string, unknown> = {};
  for (const [name, def] of Object.entries(Job.getAttributes())) {
    const field = def.field ?? name;
    if (!(field in json)) continue;
    const value = json[field];
    values[name] = value !== null && (def.type as { key?: string }).key === 'DATE' ? new Date(value as string) : value;
  }
  return Job.build(values as never, { isNewRecord: false, raw: true });
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

async function pendingSignUpHash(userId: string): Promise<string | null> {
  const token = await AuthToken.findOne({
    where: { userId, purpose: 'email_confirmation', usedAt: null, revokedAt: null, expiresAt: { [Op.gt]: new Date() } },
    order: [['createdAt', 'DESC']],
    attributes: ['passwordHash'],
  });
  return token?.passwordHash ?? null;
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
        // An unconfirmed account has no password of its own yet: the newest sign-up's choice waits
        // on its confirmation token, and is checked only to say "confirm your address first".
        const hash = !user || user.disabledAt ? null : user.emailConfirmedAt ? user.passwordHash : await pendingSignUpHash(user.id);
        if (!user || !hash) {
          await burnDummyVerify(password);
          return done(null, false);
        }
        if (!(await verifyPassword(password, hash))) return done(null, false);
        // Only now, with the password right, may the answer say the address is unconfirmed.
        if (!user.emailConfirmedAt) return done(null, false, { message: UNCONFIRMED });
        return done(null, toAuthUser(user));
      })().catch(done);
    }),
  );
  instance.serializeUser((user, done) => done(null, { id: user.id, epoch: user.sessionEpoch } satisfies SessionRef));
  instance.deserializeUser((req: Request, ref: SessionRef, done: (err: unknown, user?: Express.User | false) => void) => {
    (async () => {
      if (!ref || typeof ref.id !== 'string') return done(null, false);
      // One query for the user and, when the path names a job, the caller's membership of it
      // (read fresh on every request all the same; policy.jobMember uses it: server/policies).
      const jobId = JOB_PATH.exec(req.path)?.[1] ?? null;
      const [row] = await (User.sequelize as Sequelize).query<AuthRow>(AUTH_SQL, { bind: [ref.id, jobId], type: QueryTypes.SELECT });
      if (!row || row.disabled_at || row.session_epoch !== ref.epoch) return done(null, false);
      if (jobId) req.preloadedMembership = { jobId, role: row.role, companyId: row.member_company_id, job: row.job ? jobFromRow(row.job) : null };
      return done(null, {
        id: row.id,
        email: row.email,
        name: row.name,
        companyId: row.company_id,
        companyName: row.company_name ?? '',
        sessionEpoch: row.session_epoch,
      });
    })().catch(done);
  });
  return instance;
}
