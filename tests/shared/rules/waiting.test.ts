/**
 * How long a fix has waited for the inspector (shared/rules/waiting.ts): whole calendar days on
 * the job's clock, through todayIn. Time-zone offsets from the IANA database as shipped in the
 * runtime's ICU: New York is UTC−5 in December (EST), Tokyo UTC+9 all year (no daylight saving).
 */
import { daysWaiting, waitingSummary, waitingWords } from '../../../shared/rules/waiting';

describe('daysWaiting', () => {
  it.each([
    // Submitted 23:30 on 1 Dec in New York (04:30 UTC on the 2nd); now 09:00 on 4 Dec New York: 3 days on the job's clock.
    ['America/New_York', '2026-12-02T04:30:00Z', '2026-12-04T14:00:00Z', 3],
    // The same instants in UTC: 2 Dec to 4 Dec.
    ['UTC', '2026-12-02T04:30:00Z', '2026-12-04T14:00:00Z', 2],
    // Tokyo: 2 Dec 13:30 to 4 Dec 23:00.
    ['Asia/Tokyo', '2026-12-02T04:30:00Z', '2026-12-04T14:00:00Z', 2],
    // Submitted and read the same day: 0.
    ['America/New_York', '2026-12-04T14:00:00Z', '2026-12-04T20:00:00Z', 0],
    // Across the end of a month and a leap day (2028 is a leap year: Gregorian rule).
    ['UTC', '2028-02-27T10:00:00Z', '2028-03-01T10:00:00Z', 3],
  ] as const)('%s from %s to %s is %i days', (zone, since, now, days) => {
    expect(daysWaiting(since, zone, new Date(now))).toBe(days);
  });

  it('never counts below 0 (a clock a little behind)', () => {
    expect(daysWaiting('2026-12-05T10:00:00Z', 'UTC', new Date('2026-12-04T10:00:00Z'))).toBe(0);
  });
});

describe('words', () => {
  it.each([
    [0, 'Waiting for the inspector since today'],
    [1, 'Waiting for the inspector 1 day'],
    [3, 'Waiting for the inspector 3 days'],
  ])('%i days: %s', (days, words) => expect(waitingWords(days)).toBe(words));

  it('summarises a count and the longest wait', () => {
    expect(waitingSummary(2, 5)).toBe('2 waiting for the inspector, longest 5 days');
    expect(waitingSummary(1, 0)).toBe('1 waiting for the inspector, since today');
    expect(waitingSummary(0, null)).toBe('No fix waiting for the inspector');
  });
});
