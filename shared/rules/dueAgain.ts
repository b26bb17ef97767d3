/**
 * A returned fix gives the company the job's days for the finding's severity again, from the day
 * it was returned (server/commands/reinspectFinding.ts). The "returned" event keeps the new date
 * (`to.dueOn`) and the days it counted (`to.daysToFix`); this is the sentence the screens show.
 */
import { SEVERITY_LABELS, type Severity } from '../words';

export function dueAgainWords(
  to: Record<string, unknown> | null | undefined,
  severity: Severity,
  formatDate: (day: string) => string = (day) => day,
): string | null {
  const dueOn = to?.dueOn;
  const days = to?.daysToFix;
  if (typeof dueOn !== 'string' || typeof days !== 'number') return null;
  const label = (SEVERITY_LABELS[severity] ?? severity).toLowerCase();
  return `Due again on ${formatDate(dueOn)} (${days} day${days === 1 ? '' : 's'} for a ${label} finding)`;
}
