/**
 * Mail preferences, "send me a digest now", and the unsubscribe link (docs/api-digests.md).
 * GET   /api/me/preferences          signed in; ETag
 * PATCH /api/me/preferences          signed in; If-Match (428 missing, 412 stale); any subset of fields
 * POST  /api/me/digest               signed in; Idempotency-Key; 202, the mail goes after commit
 * GET   /api/unsubscribe/:token      public: what the link turns off (no change: GET changes nothing)
 * POST  /api/unsubscribe/:token      public: turns it off (RFC 8058 one-click; the app page too)
 *
 * The unsubscribe router is mounted in createApp BEFORE the JSON-only check and the CSRF check:
 * RFC 8058 mail clients POST "List-Unsubscribe=One-Click" as a form, with no cookie, no Origin and
 * no CSRF header. CSRF defends ambient credentials (the session cookie); these routes use none:
 * the signed token in the path is the only credential, so a forged request without it does
 * nothing. Its body is read only as that form or as JSON, at most 1 kB.
 */
import express, { Router, type Request } from 'express';
import type { z } from 'zod';
import { rateLimit } from 'express-rate-limit';
import {
  digestNowSchema,
  preferencesPatchSchema,
  unsubscribeBodySchema,
  unsubscribeParamsSchema,
  type DigestNowResponse,
  type PreferencesPatch,
  type UnsubscribeResult,
} from '../../shared/schemas/preferences';
import { HttpError, notFound, tooManyRequests } from '../errors';
import { refuseNul } from '../middleware/nul';
import type { MailService } from '../mail';
import { valid, validate } from '../middleware/validate';
import { policy } from '../policies';
import type { DigestService } from '../digests/service';
import { loadPreferences, preferencesDto, type EffectivePreferences } from '../digests/preferences';
import { changePreferences, turnOffMailList } from '../commands/changePreferences';
import { presentUnsubscribePreview } from '../presenters/preferences';
import { verifyUnsubscribeToken } from '../digests/unsubscribeToken';
import { idempotentWrite } from '../services/idempotency';
import { sequelizeOf } from '../services/records';
import { setEtag } from '../services/versioning';

export interface PreferencesRouterOptions {
  digests: DigestService;
  mail: MailService;
  /** "Send me a digest now" per user per window (default 10 per 10 minutes). */
  digestNowLimit?: { limit: number; windowMs: number };
}

function mailboxPath(mail: MailService): string | null {
  return mail.fake ? '/mailbox' : null;
}

export function preferencesRouter(options: PreferencesRouterOptions): Router {
  const router = Router();
  const { digests, mail } = options;
  const nowLimit = options.digestNowLimit ?? { limit: 10, windowMs: 10 * 60 * 1000 };
  const perUser = rateLimit({
    windowMs: nowLimit.windowMs,
    limit: nowLimit.limit,
    standardHeaders: 'draft-8',
    legacyHeaders: false,
    keyGenerator: (req) => `digest-now:${req.user?.id ?? 'anonymous'}`,
    handler: (_req, _res, next, opts) => next(tooManyRequests('You asked for several digests just now. Wait a few minutes.', Math.ceil(opts.windowMs / 1000))),
  });

  async function current(req: Request): Promise<EffectivePreferences> {
    const prefs = await loadPreferences(sequelizeOf(req), req.user!.id);
    if (!prefs) throw notFound('Your account was not found.');
    return prefs;
  }

  router.get('/me/preferences', policy.signedIn(), async (req, res) => {
    const prefs = await current(req);
    setEtag(res, prefs.version);
    res.json(preferencesDto(prefs, mailboxPath(mail)));
  });

  router.patch('/me/preferences', policy.signedIn(), validate({ body: preferencesPatchSchema }), async (req, res) => {
    const patch = valid<PreferencesPatch>(req.valid.body);
    const prefs = await changePreferences(sequelizeOf(req), req.user!.id, patch, { req, present: (p) => preferencesDto(p, mailboxPath(mail)) });
    setEtag(res, prefs.version);
    res.json(preferencesDto(prefs, mailboxPath(mail)));
  });

  router.post('/me/digest', policy.signedIn(), perUser, validate({ body: digestNowSchema }), async (req, res) => {
    await idempotentWrite(req, res, async (transaction) => {
      const built = await digests.prepareNow(req.user!.id, req);
      if (!built) throw notFound('Your account was not found.');
      mail.outbox.sendAfterCommit(transaction, built.message);
      const body: DigestNowResponse = {
        queued: true,
        to: built.message.to.address,
        subject: built.message.subject,
        findings: built.findings,
        mailboxPath: mailboxPath(mail),
      };
      return { status: 202, body };
    });
  });

  return router;
}

export interface UnsubscribeRouterOptions {
  /** Secrets that verify tokens (env.sessionSecrets: the first signs). */
  secrets: readonly string[];
}

/** Public, token-authorised; mounted before the JSON and CSRF checks (see the top of this file). */
export function unsubscribeRouter(options: UnsubscribeRouterOptions): Router {
  const router = Router();
  // This router sits before the API's own body parsers, so it runs the NUL check on its own bodies.
  const bodies = [express.urlencoded({ extended: false, limit: '1kb', parameterLimit: 5 }), express.json({ limit: '1kb', strict: true }), refuseNul];

  async function resolve(req: Request) {
    const { token } = valid<z.infer<typeof unsubscribeParamsSchema>>(req.valid.params);
    const check = verifyUnsubscribeToken(options.secrets, token);
    if (!check.ok) {
      if (check.reason === 'expired') throw new HttpError(410, 'link_expired', 'This unsubscribe link has expired. Sign in and change your preferences instead.');
      throw notFound('This unsubscribe link is not valid. Check that you copied the whole link from the mail.');
    }
    const prefs = await loadPreferences(sequelizeOf(req), check.claim.userId);
    if (!prefs) throw notFound('This unsubscribe link is not valid. Check that you copied the whole link from the mail.');
    const preview = presentUnsubscribePreview(check.claim, prefs);
    return { claim: check.claim, preview };
  }

  router.get('/unsubscribe/:token', policy.public(), validate({ params: unsubscribeParamsSchema }), async (req, res) => {
    const { preview } = await resolve(req);
    res.json(preview);
  });

  router.post('/unsubscribe/:token', policy.public(), ...bodies, validate({ params: unsubscribeParamsSchema, body: unsubscribeBodySchema }), async (req, res) => {
    const { claim, preview } = await resolve(req);
    await turnOffMailList(sequelizeOf(req), claim.userId, claim.list);
    const result: UnsubscribeResult = { ...preview, alreadyOff: true, done: true };
    res.json(result);
  });

  return router;
}
