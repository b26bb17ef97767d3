/**
 * Calendar dates (YYYY-MM-DD) as a job sees them: "today" is the date on the job's clock (its IANA
 * time zone), and due dates are whole calendar days later. One implementation for the screens and
 * the server, so a form's prefilled due date and the one the server stores cannot disagree.
 */

/** One formatter per time zone: making an Intl.DateTimeFormat costs far more than using one. */
const dayFormats = new Map<string, Intl.DateTimeFormat>();

function dayFormat(timeZone: string): Intl.DateTimeFormat {
  let format = dayFormats.get(timeZone);
  if (!format) {
    format = new Intl.DateTimeFormat('en-CA', { timeZone, year: 'numeric', month: '2-digit', day: '2-digit' });
    if (dayFormats.size < 1000) dayFormats.set(timeZone, format);
  }
  return format;
}

/**
 * Today's date (YYYY-MM-DD) in an IANA time zone. A zone the runtime does not know (an old
 * browser's time-zone data) counts as UTC rather than breaking the screen; jobs' zones are
 * checked when they are saved.
 */
export function todayIn(timeZone: string, now: Date = new Date()): string {
  let format: Intl.DateTimeFormat;
  try {
    format = dayFormat(timeZone || 'UTC');
  } catch {
    format = dayFormat('UTC');
  }
  // formatToParts, not format(): the order of a formatted date differs between ICU versions.
  const parts = format.formatToParts(now);
  const get = (t: string) => parts.find((p) => p.type === t)?.value ?? '';
  return `${get('year')}-${get('month')}-${get('day')}`;
}

/** YYYY-MM-DD plus whole days (calendar arithmetic in UTC: no daylight-saving effects). */
export function addDays(date: string, days: number): string {
  const [y, m, d] = date.split('-').map(Number);
  return new Date(Date.UTC(y!, m! - 1, d! + days)).toISOString().slice(0, 10);
}

/** Minutes since midnight on the clock of an IANA time zone (unknown zone: UTC, as todayIn). */
export function minutesIntoDay(timeZone: string, now: Date = new Date()): number {
  let parts: Intl.DateTimeFormatPart[];
  try {
    parts = new Intl.DateTimeFormat('en-GB', { timeZone: timeZone || 'UTC', hour: '2-digit', minute: '2-digit', hourCycle: 'h23' }).formatToParts(now);
  } catch {
    parts = new Intl.DateTimeFormat('en-GB', { timeZone: 'UTC', hour: '2-digit', minute: '2-digit', hourCycle: 'h23' }).formatToParts(now);
  }
  const get = (type: string) => Number(parts.find((p) => p.type === type)?.value ?? 0);
  return get('hour') * 60 + get('minute');
}
