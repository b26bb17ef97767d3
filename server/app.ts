/**
 * Builds the Express app. It does not listen (server/index.ts does) and opens no connection
 * until a request needs one, so tests import it with supertest.
 */
import fs from 'node:fs';
import path from 'node:path';
import compression from 'compression';
import expressStaticGzip from 'express-static-gzip';
import express, { type Express } from 'express';
import session from 'express-session';
import helmet from 'helmet';
import pg from 'pg';
import { deviceCookies } from './auth/deviceCookie';
import { configurePassport } from './auth/passport';
import { postgresRateLimitStores, type AccountLimits } from './services/rateLimitStore';
import { createSessionStore } from './auth/sessionStore';
import type { Database } from './db';
import type { Env } from './env';
import { apiNotFound, errorHandler, unauthorized } from './errors';
import { csrfProtection } from './middleware/csrf';
import { closeUnreadBodies, createUploadGuard, type UploadLimits } from './middleware/upload';
import { refuseNul } from './middleware/nul';
import { requireJsonBody } from './middleware/json';
import { createMailService, type MailService } from './mail';
import { accountsRouter } from './routes/accounts';
import { devMailRouter } from './routes/devMail';
import { healthRouter } from './routes/health';
import { invitationsRouter } from './routes/invitations';
import { jobsRouter } from './routes/jobs';
import { catalogueRouter } from './routes/catalogue';
import { companiesRouter } from './routes/companies';
import { crewsRouter } from './routes/crews';
import { levelsRouter } from './routes/levels';
import { membersRouter } from './routes/members';
import { spaceImportBodyParser, spacesRouter } from './routes/spaces';
import { systemsRouter } from './routes/systems';
import { unitModelsRouter } from './routes/unitModels';
import { unitImportBodyParsers, unitsRouter } from './routes/units';
import { sessionRouter } from './routes/session';
import { checksRouter } from './routes/checks';
import { findingsRouter } from './routes/findings';
import { photoMarksRouter } from './routes/photoMarks';
import { testRecordsRouter } from './routes/testRecords';
import { correctionRouter } from './routes/correction';
import { walksRouter } from './routes/walks';
import { plansRouter } from './routes/plans';
import { preferencesRouter, unsubscribeRouter } from './routes/preferences';
import { createDigestService } from './digests/service';
import { boardRouter } from './routes/board';
import { exportsRouter } from './routes/exports';
import { reportsRouter } from './routes/reports';
import { createReportQueue, type ReportQueue } from './reports/queue';
import { auditsRouter } from './routes/audits';
import { labelsRouter } from './labels/router';
import { createObjectStore, type ObjectStore } from './storage';
import { CURSOR_SECRETS_SETTING } from './services/paging';

declare module 'express-session' {
  interface SessionData {
    signedInAt: number;
    csrfToken: string;
  }
}

export const HOUR = 60 * 60 * 1000;

/** An exported asset named by its content (Metro's md5 before the extension): assets/…/font.<md5>.ttf */
const HASHED_ASSET = /^assets[\\/].+\.[0-9a-f]{32}(@\dx)?\.\w+(\.br|\.gz)?$/;
/** The service worker and the web app manifest (written by scripts/lib/pwa.ts) and public/early-session.js: never taken from an HTTP cache unchecked. */
const OFFLINE_SHELL_FILES = new Set(['sw.js', 'manifest.webmanifest', 'early-session.js']);

export interface AppOptions {
  env: Env;
  db: Database;
  /** ASVS 7.3.1 / 7.3.2: idle 2 h (rolling), absolute 12 h from sign-in. */
  sessionIdleMs?: number;
  sessionAbsoluteMs?: number;
  signInLimits?: { perAccount: number; perAddress: number; windowMs: number };
  log?: (message: string, err?: unknown) => void;
  /** Mail (server/mail): made from env when not given; tests pass one on their fake SMTP server. */
  mail?: MailService;
  /** Photo storage (server/storage): made from env when not given; tests pass one on their S3 fake. */
  objectStore?: ObjectStore;
  /** Per-user upload limits (server/middleware/upload.ts DEFAULT_UPLOAD_LIMITS when not given). */
  uploadLimits?: Partial<UploadLimits>;
  /** Where uploads' temporary folders are made (default: trimout-uploads in the OS temp folder). */
  uploadTempRoot?: string;
  /**
   * Prefix of this app's rate-limit keys in the shared table. Nodes of one deployment share the
   * default (''); tests give each app its own, so one test's counts do not reach another's.
   */
  rateLimitNamespace?: string;
  /** Queue of reports built in the background (server/reports/queue.ts): made from env when not given; server/index.ts passes the one its worker runs on. */
  reportQueue?: ReportQueue;
}

export interface TrimoutApp {
  app: Express;
  /** The /api router, for tests that walk every route. */
  api: express.Router;
  /** Ends the session store's pool. The caller closes the database. */
  close(): Promise<void>;
}

export function createApp(options: AppOptions): TrimoutApp {
  const { env, db } = options;
  const log = options.log ?? ((m: string, e?: unknown) => console.error(m, e));
  const idleMs = options.sessionIdleMs ?? 2 * HOUR;
  const absoluteMs = options.sessionAbsoluteMs ?? 12 * HOUR;
  const cookieName = env.cookieSecure ? '__Host-trimout.sid' : 'trimout.sid';
  const mail = options.mail ?? createMailService({ env, log });
  // Sign-in and account-mail limits are counted in PostgreSQL, shared by every server node.
  const signInLimits: AccountLimits = {
    ...(options.signInLimits ?? { perAccount: 10, perAddress: 100, windowMs: 15 * 60 * 1000 }),
    store: postgresRateLimitStores(db.sequelize, options.rateLimitNamespace),
  };
  const devices = deviceCookies({ secrets: env.sessionSecrets, secure: env.cookieSecure });

  const app = express();
  app.set('sequelize', db.sequelize);
  // Digests and event mails (server/digests): the finding routes reach it through req.app.get('digests').
  const digests = createDigestService({ sequelize: db.sequelize, mail, env, log });
  app.set('digests', digests);
  // List cursors are signed with the session secrets (server/services/paging.ts).
  app.set(CURSOR_SECRETS_SETTING, env.sessionSecrets);
  app.disable('x-powered-by');
  app.set('trust proxy', env.TRUST_PROXY);
  app.set('query parser', 'simple');

  app.use(
    helmet({
      contentSecurityPolicy: {
        useDefaults: true,
        directives: {
          'default-src': ["'self'"],
          'base-uri': ["'none'"],
          'object-src': ["'none'"],
          'frame-ancestors': ["'none'"],
          'script-src': ["'self'"],
          // react-native-web writes its styles into <style> elements at run time.
          'style-src': ["'self'", "'unsafe-inline'"],
          'img-src': ["'self'", 'data:', 'blob:'],
          'font-src': ["'self'", 'data:'],
          'media-src': ["'self'", 'blob:'],
          'connect-src': ["'self'"],
          // The service worker (/sw.js) and the web app manifest come from this origin only.
          'worker-src': ["'self'"],
          'manifest-src': ["'self'"],
          'form-action': ["'self'"],
          'upgrade-insecure-requests': env.cookieSecure ? [] : null,
        },
      },
      strictTransportSecurity: env.cookieSecure,
    }),
  );

  const sessionPool = new pg.Pool({ connectionString: env.DATABASE_URL, max: 5, connectionTimeoutMillis: 5_000 });
  sessionPool.on('error', (err) => log('session pool error', err));
  // Rolling idle timeout with the expiry written at most once a minute, not on every request (server/auth/sessionStore.ts).
  const store = createSessionStore(session, { pool: sessionPool, tableName: 'sessions', idleMs });

  const passport = configurePassport();
  const api = express.Router();
  api.use((_req, res, next) => {
    res.set('Cache-Control', 'no-store');
    next();
  });
  // JSON answers compressed (gzip or brotli, as the client accepts): a unit kind's defect types are
  // 62 kB as JSON, about 0.3 s on a 1.6 Mbit/s phone link, a tenth of that compressed. Only JSON:
  // exports, reports and photos stream as they are. Never an answer carrying the CSRF token
  // (carriesSecret): a secret beside other content in a compressed answer is what BREACH reads.
  api.use(
    compression({
      filter: (req, res) =>
        !res.locals.carriesSecret && /^application\/json\b/.test(String(res.getHeader('Content-Type') ?? '')) && compression.filter(req, res),
    }),
  );
  // A request refused before its body was read (an upload to a finding that is not yours):
  // the rest is discarded as it arrives, and the connection closed if it keeps coming.
  api.use(closeUnreadBodies());
  // RFC 8058 one-click unsubscribe: public, token-authorised, form or JSON body, no session and no
  // CSRF header (see server/routes/preferences.ts); so it comes before the JSON-only and CSRF checks.
  // NUL in the path or query is refused before any router (bodies again once parsed, below).
  api.use(refuseNul);
  api.use(unsubscribeRouter({ secrets: env.sessionSecrets }));
  api.use(requireJsonBody);
  // The unit import and the room schedule import take more than 100 kB; their parsers run first.
  api.use(unitImportBodyParsers());
  api.use(spaceImportBodyParser());
  api.use(express.json({ limit: '100kb', strict: true }));
  api.use(refuseNul);
  api.use(
    session({
      name: cookieName,
      store,
      secret: env.sessionSecrets,
      resave: false,
      saveUninitialized: false,
      rolling: true,
      unset: 'destroy',
      cookie: { httpOnly: true, sameSite: 'lax', secure: env.cookieSecure, maxAge: idleMs, path: '/' },
    }),
  );
  api.use(passport.initialize());
  api.use(passport.session());
  // Absolute timeout: express-session only knows idle time.
  api.use((req, res, next) => {
    if (req.user && (!req.session.signedInAt || Date.now() - req.session.signedInAt > absoluteMs)) {
      return req.session.destroy(() => {
        res.clearCookie(cookieName, { path: '/' });
        next(unauthorized('Your session has ended. Sign in again.'));
      });
    }
    next();
  });
  api.use(csrfProtection({ secret: env.sessionSecrets[0]!, publicUrl: env.PUBLIC_URL }));

  api.use(healthRouter(db.sequelize));
  api.use(
    sessionRouter({
      passport,
      csrfSecret: env.sessionSecrets[0]!,
      cookieName,
      signInLimits,
      devices,
    }),
  );
  api.use(accountsRouter({ mail, log, limits: signInLimits }));
  api.use(invitationsRouter({ mail, limits: signInLimits }));
  api.use(devMailRouter(mail));
  api.use(preferencesRouter({ digests, mail }));
  api.use(jobsRouter());
  api.use(levelsRouter());
  api.use(spacesRouter());
  api.use(systemsRouter());
  api.use(unitModelsRouter());
  api.use(unitsRouter());
  api.use(companiesRouter());
  api.use(crewsRouter());
  api.use(membersRouter());
  api.use(catalogueRouter());
  api.use(walksRouter());
  api.use(checksRouter());
  const photoStore = options.objectStore ?? createObjectStore(env);
  // One set of per-user upload limits for every upload route.
  const uploads = createUploadGuard({ limits: options.uploadLimits, tempRoot: options.uploadTempRoot });
  api.use(findingsRouter({ store: photoStore, uploads, log }));
  api.use(photoMarksRouter({ store: photoStore, log }));
  api.use(correctionRouter({ store: photoStore, uploads, log }));
  api.use(plansRouter({ store: photoStore, uploads, log }));
  api.use(testRecordsRouter({ store: photoStore, uploads, log }));
  api.use(boardRouter());
  api.use(auditsRouter());
  api.use(exportsRouter({ publicOrigin: env.publicOrigin, log }));
  const reportQueue = options.reportQueue ?? createReportQueue({ connectionString: env.DATABASE_URL, log });
  api.use(reportsRouter({ store: photoStore, queue: reportQueue, log }));
  api.use(labelsRouter({ publicOrigin: env.publicOrigin }));
  api.use(apiNotFound);

  app.use('/api', api);

  const dist = path.resolve(env.WEB_DIST);
  const indexHtml = path.join(dist, 'index.html');
  if (fs.existsSync(indexHtml)) {
    // The web app compressed (brotli or gzip, as the browser accepts): the 2.7 MB bundle is about a
    // fifth of that on the wire, which is most of a cold start on a slow phone connection. Bundles
    // and fonts go as compressed at build time (scripts/lib/precompress.ts, brotli 11), the rest
    // (index.html, sw.js, ...) on the fly. (The API's JSON is compressed by its own router, above.)
    app.use(compression());
    app.use(
      expressStaticGzip(dist, {
        enableBrotli: true,
        orderPreference: ['br', 'gzip'],
        index: false,
        serveStatic: {
          index: false,
          setHeaders: (res, file) => {
            // Bundles, and fonts and images whose names carry their content's hash: never change.
            if (file.includes(`${path.sep}_expo${path.sep}static${path.sep}`) || HASHED_ASSET.test(path.relative(dist, file))) {
              res.setHeader('Cache-Control', 'public, max-age=31536000, immutable');
            } else if (OFFLINE_SHELL_FILES.has(path.relative(dist, file))) {
              // Checked on every load, so a deploy reaches installed apps at their next start.
              res.setHeader('Cache-Control', 'no-cache');
              if (file.endsWith('.webmanifest')) res.setHeader('Content-Type', 'application/manifest+json; charset=utf-8');
            }
          },
        },
      }),
    );
    // Client routes (/sign-in, /jobs/...) all load the single-page app.
    app.get('/{*splat}', (_req, res) => {
      res.set('Cache-Control', 'no-cache');
      // root + relative name: a dot folder above dist/ (a checkout in ~/.cache, say) must not hide the app.
      res.sendFile('index.html', { root: dist });
    });
  }
  app.use(errorHandler(log));

  return {
    app,
    api,
    close: async () => {
      await sessionPool.end();
      if (!options.reportQueue) await reportQueue.stop();
    },
  };
}
