/**
 * A new finding's due date (shared/rules/due.ts): today in the job's zone plus the job's days for
 * the severity. Default days (critical 2, major 7, minor 14) are common practice, set per job.
 */
import { daysToFix, dueOnFor } from '../../../shared/rules/due';

describe('dueOnFor', () => {
  const now = new Date('2026-12-03T03:00:00Z'); // still 2 December in Los Angeles (PST, UTC−8; IANA tz "northamerica")

  it.each([
    ['critical', '2026-12-05'],
    ['major', '2026-12-10'],
    ['minor', '2026-12-17'],
  ] as const)('default policy, UTC job: %s → %s', (severity, expected) => {
    expect(dueOnFor({ timeZone: 'UTC' }, severity, now)).toBe(expected);
  });

  it("counts from today in the job's zone, not the server's", () => {
    expect(dueOnFor({ timeZone: 'America/Los_Angeles' }, 'major', now)).toBe('2026-12-09');
  });

  it("takes the job's own days, and the defaults for severities it does not set", () => {
    const job = { timeZone: 'UTC', severityDueDays: { critical: 1, major: 3 } };
    expect(daysToFix(job, 'critical')).toBe(1);
    expect(dueOnFor(job, 'major', now)).toBe('2026-12-06');
    expect(dueOnFor(job, 'minor', now)).toBe('2026-12-17');
  });
});
