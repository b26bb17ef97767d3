/** How a kept level is described: "Level 3 kept on this phone, 14 MB, updated 08:12". */

const KB = 1024;
const MB = 1024 * 1024;

/** Sizes as a phone's settings screen shows them: "14 MB", "2.4 MB", "380 KB". */
export function formatBytes(bytes: number): string {
  if (bytes >= 10 * MB) return `${Math.round(bytes / MB)} MB`;
  if (bytes >= MB) return `${(Math.round((bytes / MB) * 10) / 10).toFixed(1)} MB`;
  return `${Math.max(1, Math.round(bytes / KB))} KB`;
}

/** "08:12" today, "2 Dec 08:12" another day, in the job's time zone. */
export function formatUpdated(iso: string, timeZone: string, now: Date = new Date()): string {
  const at = new Date(iso);
  const opts = { timeZone } as const;
  try {
    const time = at.toLocaleTimeString('en-GB', { ...opts, hour: '2-digit', minute: '2-digit' });
    const day = (d: Date) => d.toLocaleDateString('en-GB', opts);
    if (day(at) === day(now)) return time;
    return `${at.toLocaleDateString('en-GB', { ...opts, day: 'numeric', month: 'short' })} ${time}`;
  } catch {
    return iso.slice(0, 16).replace('T', ' ');
  }
}

export function keptSentence(levelName: string, bytes: number, updatedAt: string, timeZone: string, now?: Date): string {
  return `${levelName} kept on this phone, ${formatBytes(bytes)}, updated ${formatUpdated(updatedAt, timeZone, now)}`;
}
