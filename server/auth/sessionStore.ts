/**
 * The session store: connect-pg-simple, with the idle-timeout "touch" throttled.
 *
 * express-session with `rolling: true` moves a session's expiry on every request; with
 * connect-pg-simple that is an UPDATE of the session row on every API call, and the response
 * waits for it. Here a request moves the stored expiry only when at least `touchAfterMs` passed
 * since it was last moved (the stored expiry is read with the session). So the server-side idle
 * timeout stays "idle for `idleMs` after the last request", early by at most `touchAfterMs`
 * (default: a minute on the two-hour idle timeout), never late: the safe side for ASVS 7.3.1.
 * Writes of a changed session (sign-in, CSRF token) go through set() as before.
 */
import type { Request } from 'express';
import type session from 'express-session';
import connectPgSimple from 'connect-pg-simple';
import type pg from 'pg';

const STORED_EXPIRY = Symbol('trimout.storedSessionExpiry');

/** connect-pg-simple's own helpers (public methods, untyped in @types/connect-pg-simple). */
interface PgStoreInternals {
  query(q: string, params: unknown[], cb: (err: unknown, row?: { sess: unknown; expire: Date }) => void): void;
  quotedTable(): string;
}
type SessionWithReq = session.SessionData & { req?: Request & { [STORED_EXPIRY]?: number } };

export interface SessionStoreOptions {
  pool: pg.Pool;
  tableName: string;
  /** The idle timeout; the touch interval is a tenth of it, at most a minute. */
  idleMs: number;
}

export function createSessionStore(expressSession: typeof session, options: SessionStoreOptions): session.Store {
  const PgStore = connectPgSimple(expressSession);
  const touchAfterMs = Math.min(60_000, Math.floor(options.idleMs / 10));

  class ThrottledPgStore extends PgStore {
    /** As connect-pg-simple's get(), also reading when the stored session expires. */
    override get(sid: string, fn: (err: unknown, session?: session.SessionData | null) => void): void {
      const internals = this as unknown as PgStoreInternals;
      internals.query(
        `SELECT sess, expire FROM ${internals.quotedTable()} WHERE sid = $1 AND expire >= to_timestamp($2)`,
        [sid, Math.ceil(Date.now() / 1000)],
        (err, row) => {
          if (err) return fn(err);
          if (!row) return fn(null);
          let sess: Record<string, unknown>;
          try {
            sess = (typeof row.sess === 'string' ? JSON.parse(row.sess) : row.sess) as Record<string, unknown>;
          } catch {
            return this.destroy(sid, fn);
          }
          Object.defineProperty(sess, STORED_EXPIRY, { value: new Date(row.expire).getTime(), enumerable: false });
          fn(null, sess as unknown as session.SessionData);
        },
      );
    }

    override createSession(req: Request, sess: session.SessionData): session.Session & session.SessionData {
      const stored = (sess as unknown as Record<symbol, unknown>)[STORED_EXPIRY];
      const created = super.createSession(req, sess);
      (req as Request & { [STORED_EXPIRY]?: number })[STORED_EXPIRY] = typeof stored === 'number' ? stored : undefined;
      return created;
    }

    override touch(sid: string, sess: session.SessionData, fn?: () => void): void {
      const stored = (sess as SessionWithReq).req?.[STORED_EXPIRY];
      const next = sess.cookie?.expires ? new Date(sess.cookie.expires).getTime() : NaN;
      // Skip only when the stored expiry was moved less than touchAfterMs ago. connect-pg-simple
      // stores whole seconds rounded up, so a fresh one may lie up to a second after `next`; one
      // lying further ahead than that (a shorter idle timeout since) is written down at once.
      const movedAgo = next - stored!;
      if (typeof stored === 'number' && Number.isFinite(next) && movedAgo > -1000 && movedAgo < touchAfterMs) {
        fn?.();
        return;
      }
      super.touch(sid, sess, fn);
    }
  }

  return new ThrottledPgStore({ pool: options.pool, tableName: options.tableName, createTableIfMissing: false, pruneSessionInterval: false });
}
