/**
 * Signed unsubscribe tokens for the links and List-Unsubscribe headers of digests and event mails.
 * Stateless: base64url(JSON {u: user id, l: list, e: expiry in Unix seconds}) "." base64url(HMAC-SHA256).
 * The key is derived from the session secret (HMAC(secret, "trimout-unsubscribe-v1")), so a token
 * cannot be replayed as anything else; every configured secret verifies (rotation), the first signs.
 * A token works without a session for 90 days: mails are read late, and turning mail off is harmless.
 */
import { createHmac, timingSafeEqual } from 'node:crypto';
import { z } from 'zod';
import { UNSUBSCRIBE_LISTS, type UnsubscribeList } from '../../shared/schemas/preferences';

export const UNSUBSCRIBE_LIFETIME_MS = 90 * 24 * 60 * 60 * 1000;

const payloadSchema = z.object({ u: z.string().uuid(), l: z.enum(UNSUBSCRIBE_LISTS), e: z.number().int().positive() }).strict();

export interface UnsubscribeClaim {
  userId: string;
  list: UnsubscribeList;
  expiresAt: Date;
}

function keyFor(secret: string): Buffer {
  return createHmac('sha256', secret).update('trimout-unsubscribe-v1').digest();
}

function sign(payload: string, secret: string): string {
  return createHmac('sha256', keyFor(secret)).update(payload).digest('base64url');
}

export function signUnsubscribeToken(secrets: readonly string[], userId: string, list: UnsubscribeList, now: Date = new Date()): string {
  const e = Math.floor((now.getTime() + UNSUBSCRIBE_LIFETIME_MS) / 1000);
  const payload = Buffer.from(JSON.stringify({ u: userId, l: list, e }), 'utf8').toString('base64url');
  return `${payload}.${sign(payload, secrets[0]!)}`;
}

export type TokenCheck = { ok: true; claim: UnsubscribeClaim } | { ok: false; reason: 'invalid' | 'expired' };

/** Checks the signature first (constant-time), then the payload, then the expiry. */
export function verifyUnsubscribeToken(secrets: readonly string[], token: string, now: Date = new Date()): TokenCheck {
  const dot = token.indexOf('.');
  if (dot <= 0) return { ok: false, reason: 'invalid' };
  const payload = token.slice(0, dot);
  const given = Buffer.from(token.slice(dot + 1), 'utf8');
  const good = secrets.some((secret) => {
    const expected = Buffer.from(sign(payload, secret), 'utf8');
    return expected.length === given.length && timingSafeEqual(expected, given);
  });
  if (!good) return { ok: false, reason: 'invalid' };
  let parsed: z.infer<typeof payloadSchema>;
  try {
    const result = payloadSchema.safeParse(JSON.parse(Buffer.from(payload, 'base64url').toString('utf8')));
    if (!result.success) return { ok: false, reason: 'invalid' };
    parsed = result.data;
  } catch {
    return { ok: false, reason: 'invalid' };
  }
  const expiresAt = new Date(parsed.e * 1000);
  if (expiresAt.getTime() <= now.getTime()) return { ok: false, reason: 'expired' };
  return { ok: true, claim: { userId: parsed.u, list: parsed.l, expiresAt } };
}
