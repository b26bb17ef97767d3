/**
 * How a digest names its schedule: the mail's subject and first line, the schedule sentence at
 * the foot of the mail and on the preferences screen. Written once here so the mail and the
 * screen cannot say different things (a weekly Thursday digest never calls itself daily).
 */
import { WEEKDAY_LABELS, type DigestFrequency } from './schemas/preferences';

export interface DigestSchedule {
  frequency: DigestFrequency;
  /** ISO weekday, 1 Monday … 7 Sunday; read only when weekly. */
  weekday: number;
  /** Local hour 0–23 in `timeZone`. */
  hour: number;
  timeZone: string;
}

/** The period a digest covers: the last day, or the last seven days. */
export type DigestSpan = 'daily' | 'weekly';

/** "07:00". */
export function digestHourLabel(hour: number): string {
  return `${String(hour).padStart(2, '0')}:00`;
}

function weekdayName(weekday: number): string {
  return WEEKDAY_LABELS[weekday] ?? WEEKDAY_LABELS[1]!;
}

/** "every day at 07:00 (America/Chicago)", "every Thursday at 07:00 (America/Chicago)", or null when off. */
export function digestWhen(s: DigestSchedule): string | null {
  const at = `at ${digestHourLabel(s.hour)} (${s.timeZone})`;
  if (s.frequency === 'daily') return `every day ${at}`;
  if (s.frequency === 'weekly') return `every ${weekdayName(s.weekday)} ${at}`;
  return null;
}

/** The schedule sentence: on the preferences screen and at the foot of every digest. */
export function digestScheduleSentence(s: DigestSchedule): string {
  if (s.frequency === 'off') return 'No digest is sent on a schedule.';
  const how = s.frequency === 'weekly' ? 'once a week, ' : '';
  return `Your digest comes ${how}${digestWhen(s)}.`;
}

/**
 * The mail's name for itself. `span` is the period the mail covers; the weekday is named when the
 * chosen schedule is weekly, so a Thursday digest says "(Thursdays)" in its subject and first line.
 */
export function digestName(span: DigestSpan, s: DigestSchedule): { subjectLead: string; heading: (name: string) => string } {
  if (span === 'weekly') {
    const day = s.frequency === 'weekly' ? ` (${weekdayName(s.weekday)}s)` : '';
    return { subjectLead: `Weekly Trimout digest${day}`, heading: (name) => `Weekly digest for ${name}${day}` };
  }
  return { subjectLead: 'Daily Trimout digest', heading: (name) => `Daily digest for ${name}` };
}
