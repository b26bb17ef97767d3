/** Dates of findings as the job sees them (its time zone), for the form's prefill and the list. */
// The rules themselves are shared with the server (shared/rules): one implementation each.
export { addDays, todayIn } from '../../shared/rules/dates';
export { suggestedCompany as suggestCompany } from '../../shared/rules/suggestedCompany';

/** "Fri 4 Dec 2026" for a YYYY-MM-DD (read as a calendar date, no time zone shift). */
export function formatDay(date: string): string {
  const [y, m, d] = date.split('-').map(Number);
  return new Date(Date.UTC(y!, m! - 1, d!)).toLocaleDateString('en-GB', { timeZone: 'UTC', weekday: 'short', day: 'numeric', month: 'short', year: 'numeric' });
}

/** "4 Dec 2026, 14:02" in the job's time zone. */
export function formatWhen(iso: string, timeZone: string): string {
  const at = new Date(iso);
  try {
    return at.toLocaleString('en-GB', { timeZone, day: 'numeric', month: 'short', year: 'numeric', hour: '2-digit', minute: '2-digit' });
  } catch {
    return at.toISOString();
  }
}
