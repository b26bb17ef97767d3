/**
 * A device that has signed in to an account before gets a long-lived cookie naming that account
 * (a keyed hash of the e-mail, never the e-mail itself) and the device, signed with the session
 * secret. Failed sign-ins from such a device count against the device's own budget, not the
 * account's, so a stranger who exhausts the account's budget by guessing cannot lock the owner
 * out of the phones they already use (OWASP: "Slow Down Online Guessing Attacks with Device
 * Cookies"). A new device waits for the account's window, or follows a password reset link,
 * which signs in by itself.
 */
import { createHmac, randomBytes, timingSafeEqual } from 'node:crypto';
import type { CookieOptions, Request, Response } from 'express';

const YEAR_MS = 365 * 24 * 60 * 60 * 1000;

function mac(secret: string, text: string): string {
  return createHmac('sha256', secret).update(text).digest('base64url').slice(0, 32);
}

function accountKey(secret: string, email: string): string {
  return mac(secret, `device-account:${email.trim().toLowerCase()}`);
}

export interface DeviceCookies {
  name: string;
  /** The device id when the request carries a valid device cookie for this e-mail, else null. */
  deviceFor(req: Request, email: string): string | null;
  /** Remembers this device for this account (after a successful sign-in). */
  remember(res: Response, email: string): void;
}

export function deviceCookies(options: { secrets: string[]; secure: boolean }): DeviceCookies {
  const name = options.secure ? '__Host-trimout.device' : 'trimout.device';
  const cookie: CookieOptions = { httpOnly: true, sameSite: 'lax', secure: options.secure, maxAge: YEAR_MS, path: '/' };
  return {
    name,
    deviceFor(req, email) {
      const value = readCookie(req, name);
      const [account, device, signature] = value?.split('.') ?? [];
      if (!account || !device || !signature) return null;
      for (const secret of options.secrets) {
        if (!same(account, accountKey(secret, email))) continue;
        if (same(signature, mac(secret, `${account}.${device}`))) return device;
      }
      return null;
    },
    remember(res, email) {
      const secret = options.secrets[0]!;
      const account = accountKey(secret, email);
      const device = randomBytes(16).toString('base64url');
      res.cookie(name, `${account}.${device}.${mac(secret, `${account}.${device}`)}`, cookie);
    },
  };
}

function same(a: string, b: string): boolean {
  const x = Buffer.from(a);
  const y = Buffer.from(b);
  return x.length === y.length && timingSafeEqual(x, y);
}

/** One cookie's value from the Cookie header (the API has no cookie parser of its own). */
function readCookie(req: Request, name: string): string | undefined {
  for (const part of (req.get('cookie') ?? '').split(';')) {
    const eq = part.indexOf('=');
    if (eq > 0 && part.slice(0, eq).trim() === name) {
      try {
        return decodeURIComponent(part.slice(eq + 1).trim());
      } catch {
        return undefined;
      }
    }
  }
  return undefined;
}
