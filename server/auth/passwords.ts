/**
 * Password hashing with Node's scrypt at the OWASP Password Storage Cheat Sheet's
 * parameters (N=2^17, r=8, p=1, 16-byte salt, 32-byte key). The parameters are stored with
 * each hash, so they can be raised later without breaking old hashes.
 * Format: scrypt$<N>$<r>$<p>$<salt base64>$<key base64>
 */
import { randomBytes, scrypt as scryptCb, timingSafeEqual, type ScryptOptions } from 'node:crypto';
import { PASSWORD_MAX, PASSWORD_MIN } from '../../shared/schemas/session';

export const SCRYPT_PARAMS = { N: 2 ** 17, r: 8, p: 1, keyLength: 32 } as const;

function scrypt(password: string, salt: Buffer, keyLength: number, options: ScryptOptions): Promise<Buffer> {
  return new Promise((resolve, reject) => {
    scryptCb(password, salt, keyLength, options, (err, key) => (err ? reject(err) : resolve(key)));
  });
}

const maxmem = (N: number, r: number) => 128 * N * r * 2;

export async function hashPassword(password: string): Promise<string> {
  if (password.length < PASSWORD_MIN || password.length > PASSWORD_MAX) {
    throw new Error('password length out of range');
  }
  const { N, r, p, keyLength } = SCRYPT_PARAMS;
  const salt = randomBytes(16);
  const key = await scrypt(password, salt, keyLength, { N, r, p, maxmem: maxmem(N, r) });
  return ['scrypt', N, r, p, salt.toString('base64'), key.toString('base64')].join('$');
}

export function parseHash(stored: string) {
  const [scheme, n, r, p, salt, key] = stored.split('$');
  if (scheme !== 'scrypt' || !salt || !key) return null;
  return { N: Number(n), r: Number(r), p: Number(p), salt: Buffer.from(salt, 'base64'), key: Buffer.from(key, 'base64') };
}

export async function verifyPassword(password: string, stored: string): Promise<boolean> {
  const parsed = parseHash(stored);
  if (!parsed) return false;
  const { N, r, p, salt, key } = parsed;
  const candidate = await scrypt(password, salt, key.length, { N, r, p, maxmem: maxmem(N, r) });
  return candidate.length === key.length && timingSafeEqual(candidate, key);
}

let dummy: Promise<string> | undefined;
/**
 * For an unknown e-mail, verify against a dummy hash of the same cost so that the answer
 * takes about as long as for a wrong password (no account enumeration by timing).
 */
export async function burnDummyVerify(password: string): Promise<void> {
  dummy ??= hashPassword('dummy-password-for-timing');
  await verifyPassword(password, await dummy);
}
