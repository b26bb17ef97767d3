/** Dates of findings as the job sees them (its time zone), for the form's prefill and the list. */
import type { TradeKey } from '../../shared/words';
import type { JobCompanyDto } from '../../shared/schemas/setup';

/** Today as YYYY-MM-DD in a time zone. */
export function todayIn(timeZone: string, now: Date = new Date()): string {
  try {
    return new Intl.DateTimeFormat('en-CA', { timeZone, year: 'numeric', month: '2-digit', day: '2-digit' }).format(now);
  } catch {
    return now.toISOString().slice(0, 10);
  }
}

/** YYYY-MM-DD plus whole days. */
export function addDays(date: string, days: number): string {
  const [y, m, d] = date.split('-').map(Number);
  return new Date(Date.UTC(y!, m! - 1, d! + days)).toISOString().slice(0, 10);
}

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

/** The company suggested for a defect type: the first (by name) whose trades include the type's trade. */
export function suggestCompany(companies: readonly JobCompanyDto[], trade: TradeKey | undefined): JobCompanyDto | undefined {
  if (!trade) return undefined;
  return [...companies].filter((c) => c.trades.includes(trade)).sort((a, b) => a.name.localeCompare(b.name))[0];
}
