/**
 * The single path for every client write. Each write gets the CSRF token and, for POST, an
 * Idempotency-Key made once per logical action: a retry of the same action reuses the key, so
 * the server never creates a second record. A write is a plain object, so it can be kept and sent
 * again later; its Idempotency-Key makes a resend safe.
 */
import { getCsrfToken, request, requestWithMeta, type WithMeta } from './client';

export interface Write {
  method: 'POST' | 'PUT' | 'PATCH' | 'DELETE';
  path: string;
  /** JSON-encoded, or a FormData (multipart, e.g. a finding with its photos) sent as it is. */
  body?: unknown;
  /** Made by newWrite(); kept across retries of the same action. */
  idempotencyKey?: string;
  /** The version the user saw, for PATCH/DELETE (If-Match). */
  ifMatch?: string;
}

/** A random UUID v4: Idempotency-Keys, and ids made on the phone (a finding logged offline, an outbox entry). */
export function newClientId(): string {
  const c = globalThis.crypto as Crypto | undefined;
  if (c?.randomUUID) return c.randomUUID();
  // Fallback for old engines: 122 random bits from getRandomValues, formatted as a UUID v4.
  const b = new Uint8Array(16);
  c!.getRandomValues(b);
  b[6] = (b[6]! & 0x0f) | 0x40;
  b[8] = (b[8]! & 0x3f) | 0x80;
  const h = Array.from(b, (x) => x.toString(16).padStart(2, '0')).join('');
  return `${h.slice(0, 8)}-${h.slice(8, 12)}-${h.slice(12, 16)}-${h.slice(16, 20)}-${h.slice(20)}`;
}

export function newWrite(write: Omit<Write, 'idempotencyKey'>): Write {
  return { ...write, idempotencyKey: write.method === 'POST' ? newClientId() : undefined };
}

/**
 * Sends one write. A FormData body keeps the same headers (CSRF, Idempotency-Key, If-Match) and
 * no Content-Type of ours: the browser sets multipart/form-data with its boundary.
 */
export function sendWrite<T>(write: Write): Promise<T> {
  const headers: Record<string, string> = { 'X-CSRF-Token': getCsrfToken() };
  if (write.idempotencyKey) headers['Idempotency-Key'] = write.idempotencyKey;
  if (write.ifMatch) headers['If-Match'] = write.ifMatch;
  return request<T>(write.method, write.path, { body: write.body, headers });
}

/** GET of a record with its ETag: what the server holds now, for a kept write to be applied again on it. */
export function readCurrent<T>(path: string): Promise<WithMeta<T>> {
  return requestWithMeta<T>('GET', path);
}
