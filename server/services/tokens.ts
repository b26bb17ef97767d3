/**
 * One-time tokens sent by mail. The token is 32 random bytes (base64url, 43 characters); the
 * database keeps only its SHA-256, so a leaked table grants nothing. Consuming a token is one
 * atomic statement, UPDATE ... WHERE used_at IS NULL AND revoked_at IS NULL AND expires_at > now()
 * RETURNING *, so two clicks racing cannot both win.
 */
import { createHash, randomBytes } from 'node:crypto';
import { Op, fn, type Transaction } from 'sequelize';
import { HttpError, notFound } from '../errors';
import { AuthToken, type TokenPurpose } from '../models/AuthToken';

const HOUR_MS = 60 * 60 * 1000;
export const TOKEN_LIFETIME_MS: Record<TokenPurpose, number> = {
  invitation: 7 * 24 * HOUR_MS,
  password_reset: 1 * HOUR_MS,
  email_confirmation: 24 * HOUR_MS,
};

export const TOKEN_PATTERN = /^[A-Za-z0-9_-]{43}$/;

export function hashToken(token: string): string {
  return createHash('sha256').update(token, 'utf8').digest('hex');
}

export function newToken(): { token: string; tokenHash: string } {
  const token = randomBytes(32).toString('base64url');
  return { token, tokenHash: hashToken(token) };
}

type Payload = Partial<Pick<AuthToken, 'userId' | 'email' | 'name' | 'jobId' | 'role' | 'companyId' | 'invitedBy' | 'passwordHash' | 'companyName'>>;

/** Stores a new token of this purpose and returns the token itself (to put in a mail, once). */
export async function issueToken(purpose: TokenPurpose, payload: Payload, transaction: Transaction): Promise<{ token: string; row: AuthToken }> {
  const { token, tokenHash } = newToken();
  const row = await AuthToken.create(
    { purpose, tokenHash, ...payload, expiresAt: new Date(Date.now() + TOKEN_LIFETIME_MS[purpose]) },
    { transaction },
  );
  return { token, row };
}

export const LINK_NOT_VALID = 'This link is not valid. Check that you copied the whole link from the mail.';
export const LINK_EXPIRED = 'This link has expired. Ask for a new one.';
export const LINK_USED = 'This link was already used. Ask for a new one if you still need it.';
/** A link that died before use, said for what it was. */
export const LINK_REVOKED: Record<TokenPurpose, string> = {
  invitation: 'This invitation was withdrawn. Ask the GC manager for a new one.',
  password_reset: 'This password reset link was replaced by a newer one, or the password was changed since. Ask for a new link if you still need one.',
  email_confirmation:
    'This confirmation link was replaced: the address was confirmed through another link, or its password was reset. Sign in, or use "Forgot your password?".',
};

/** Why a token cannot be used: unknown or another purpose → 404; used, withdrawn or expired → 410. */
function refusal(row: AuthToken | null): HttpError {
  if (!row) return notFound(LINK_NOT_VALID);
  if (row.usedAt) return new HttpError(410, 'link_used', LINK_USED);
  if (row.revokedAt) return new HttpError(410, 'link_revoked', LINK_REVOKED[row.purpose]);
  return new HttpError(410, 'link_expired', LINK_EXPIRED);
}

/** Reads a token without using it; throws 404/410 unless it can still be used. */
export async function inspectToken(token: string, purpose: TokenPurpose, transaction?: Transaction): Promise<AuthToken> {
  const row = await AuthToken.findOne({ where: { tokenHash: hashToken(token), purpose }, transaction });
  if (!row || row.usedAt || row.revokedAt || row.expiresAt.getTime() <= Date.now()) throw refusal(row);
  return row;
}

/** Uses a token, atomically, inside the caller's transaction; throws 404/410 when it cannot. */
export async function consumeToken(token: string, purpose: TokenPurpose, transaction: Transaction): Promise<AuthToken> {
  const tokenHash = hashToken(token);
  const [count, rows] = await AuthToken.update(
    { usedAt: fn('now') as unknown as Date }, // SQL now(): the database's clock decides, as in the WHERE
    {
      where: { tokenHash, purpose, usedAt: null, revokedAt: null, expiresAt: { [Op.gt]: fn('now') } },
      returning: true,
      transaction,
    },
  );
  if (count === 1 && rows[0]) return rows[0];
  throw refusal(await AuthToken.findOne({ where: { tokenHash, purpose }, transaction }));
}
