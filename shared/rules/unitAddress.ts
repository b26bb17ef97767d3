/**
 * A unit's address in Trimout: what a unit label's QR code holds and what "Scan a unit" reads back.
 * Written once so the printed code and the scanner cannot drift (the path is the unit check's,
 * components/links.ts links.unitCheck).
 */

const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

/** `/jobs/<jobId>/units/<unitId>/check` */
export function unitAddressPath(jobId: string, unitId: string): string {
  return `/jobs/${encodeURIComponent(jobId)}/units/${encodeURIComponent(unitId)}/check`;
}

/** The full address on the public origin (PUBLIC_URL): the printed code works from any phone's camera too. */
export function unitAddress(origin: string, jobId: string, unitId: string): string {
  return `${origin.replace(/\/+$/, '')}${unitAddressPath(jobId, unitId)}`;
}

export interface ScannedUnit {
  jobId: string;
  unitId: string;
}

/**
 * The job and unit a scanned text names, or null when it is not a unit address. The origin is
 * not checked (a label printed before a move of the server still names its unit); the ids are.
 */
export function parseUnitAddress(text: string): ScannedUnit | null {
  let path: string;
  try {
    path = new URL(text.trim(), 'http://scan.invalid').pathname;
  } catch {
    return null;
  }
  const m = /^\/jobs\/([^/]+)\/units\/([^/]+)\/check\/?$/.exec(path);
  if (!m) return null;
  const jobId = decodeURIComponent(m[1]!);
  const unitId = decodeURIComponent(m[2]!);
  if (!UUID.test(jobId) || !UUID.test(unitId)) return null;
  return { jobId: jobId.toLowerCase(), unitId: unitId.toLowerCase() };
}
