/**
 * A fix waiting for re-inspection waits on the inspector, not on the subcontractor (so it is never
 * overdue: due.ts isOverdue). How long it has waited is counted in whole calendar days on the
 * job's clock, from the day the latest fix was submitted to today, with todayIn: a fix submitted
 * late in the evening on the job's clock counts from that day, whatever the server's zone.
 */
import { todayIn } from './dates';

/** Whole calendar days between two YYYY-MM-DD dates (to - from), in UTC arithmetic as addDays. */
function daysBetween(from: string, to: string): number {
  const utc = (d: string) => {
    const [y, m, day] = d.split('-').map(Number);
    return Date.UTC(y!, m! - 1, day!);
  };
  return Math.round((utc(to) - utc(from)) / 86_400_000);
}

/** Days a fix submitted at `submittedAt` has waited for the inspector, on the job's clock (never below 0). */
export function daysWaiting(submittedAt: Date | string, timeZone: string, now: Date = new Date()): number {
  const since = todayIn(timeZone, typeof submittedAt === 'string' ? new Date(submittedAt) : submittedAt);
  return Math.max(0, daysBetween(since, todayIn(timeZone, now)));
}

/** "Waiting for the inspector since today" / "… 1 day" / "… 3 days". */
export function waitingWords(days: number): string {
  if (days <= 0) return 'Waiting for the inspector since today';
  return `Waiting for the inspector ${days} day${days === 1 ? '' : 's'}`;
}

/** "2 waiting for the inspector, longest 5 days" for a count of waiting fixes and the longest wait. */
export function waitingSummary(count: number, longestDays: number | null): string {
  if (count === 0) return 'No fix waiting for the inspector';
  const longest = longestDays === null ? '' : longestDays <= 0 ? ', since today' : `, longest ${longestDays} day${longestDays === 1 ? '' : 's'}`;
  return `${count} waiting for the inspector${longest}`;
}
