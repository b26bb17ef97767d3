/**
 * The version tag of a versioned record: the server sends it as a strong ETag (RFC 9110 §8.8.3)
 * and the screens send it back in If-Match. Written once so the two sides cannot drift.
 */
export function etagOf(version: number): string {
  return `"v${version}"`;
}
