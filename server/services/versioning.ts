/**
 * Optimistic concurrency (RFC 9110 §8.8.3 and §13.1.1, RFC 6585 §3): every versioned record is
 * sent with a strong ETag carrying its version; a change must send it back in If-Match.
 * Missing → 428, stale → 412 with the current record so the screen can show it.
 */
import type { Request, Response } from 'express';
import { etagOf } from '../../shared/rules/etag';
import { HttpError, preconditionRequired } from '../errors';

export { etagOf };

export function setEtag(res: Response, version: number): void {
  res.set('ETag', etagOf(version));
}

/** Compares the client's If-Match with the version just read (inside the write's transaction, FOR UPDATE). */
export function checkIfMatch(req: Request, currentVersion: number, current?: unknown): void {
  checkVersion(req.get('if-match'), currentVersion, current);
}

/** checkIfMatch for code that holds the header's value, not the request (services, commands). */
export function checkVersion(ifMatch: string | undefined, currentVersion: number, current?: unknown): void {
  if (!ifMatch) throw preconditionRequired('Send If-Match with the ETag of the version you are changing.');
  if (versionMatches(ifMatch, currentVersion)) return;
  throw Object.assign(
    new HttpError(412, 'stale', 'Someone else changed this since you loaded it. Review the current version and try again.'),
    { current },
  );
}

/** True when an If-Match value names this version (or is `*`). */
export function versionMatches(ifMatch: string, currentVersion: number): boolean {
  const tags = ifMatch.split(',').map((t) => t.trim());
  return tags.includes('*') || tags.includes(etagOf(currentVersion));
}
