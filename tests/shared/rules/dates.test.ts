/**
 * Dates as a job sees them (shared/rules/dates.ts), checked against outside sources: the IANA
 * time zone database's rules (as shipped in the runtime's ICU, read through Intl) at instants
 * either side of a local midnight and of a daylight-saving change, and the Gregorian calendar's
 * leap-year rule.
 */
import { addDays, minutesIntoDay, todayIn } from '../../../shared/rules/dates';

describe('todayIn', () => {
  it.each([
    // America/New_York in December is EST, UTC−5 (IANA tz "northamerica", US rules): local midnight is 05:00 UTC.
    ['America/New_York', '2026-12-03T04:59:59Z', '2026-12-02'],
    ['America/New_York', '2026-12-03T05:00:00Z', '2026-12-03'],
    // US daylight saving 2026 starts Sunday 8 March at 02:00 local (second Sunday in March, Energy Policy Act of 2005):
    // from then EDT, UTC−4, so local midnight of 9 March is 04:00 UTC.
    ['America/New_York', '2026-03-09T03:59:59Z', '2026-03-08'],
    ['America/New_York', '2026-03-09T04:00:00Z', '2026-03-09'],
    // EU summer time 2026 starts Sunday 29 March at 01:00 UTC (last Sunday in March, Directive 2000/84/EC): London is then UTC+1.
    ['Europe/London', '2026-03-28T23:30:00Z', '2026-03-28'],
    ['Europe/London', '2026-03-29T23:30:00Z', '2026-03-30'],
    // Pacific/Auckland in December is NZDT, UTC+13 (IANA tz "australasia"): already tomorrow at 11:00 UTC.
    ['Pacific/Auckland', '2026-12-02T10:59:59Z', '2026-12-02'],
    ['Pacific/Auckland', '2026-12-02T11:00:00Z', '2026-12-03'],
    // Asia/Kolkata is UTC+5:30 all year (IANA tz "asia"): the half hour counts.
    ['Asia/Kolkata', '2026-12-02T18:29:59Z', '2026-12-02'],
    ['Asia/Kolkata', '2026-12-02T18:30:00Z', '2026-12-03'],
    ['UTC', '2026-12-02T23:59:59Z', '2026-12-02'],
  ])('%s at %s is %s', (zone, instant, expected) => {
    expect(todayIn(zone, new Date(instant))).toBe(expected);
  });

  it('counts an empty or unknown zone as UTC instead of throwing', () => {
    const at = new Date('2026-12-02T23:30:00Z');
    expect(todayIn('', at)).toBe('2026-12-02');
    expect(todayIn('Mars/Olympus_Mons', at)).toBe('2026-12-02');
  });
});

describe('addDays', () => {
  it.each([
    ['2026-12-02', 7, '2026-12-09'],
    ['2026-12-30', 2, '2027-01-01'], // year end
    ['2027-01-01', -1, '2026-12-31'],
    ['2028-02-28', 1, '2028-02-29'], // Gregorian calendar: 2028 is divisible by 4, a leap year
    ['2100-02-28', 1, '2100-03-01'], // Gregorian calendar: 2100 is divisible by 100 and not by 400, no leap year
    ['2000-02-28', 1, '2000-02-29'], // Gregorian calendar: 2000 is divisible by 400, a leap year
    // Whole calendar days, never 24-hour steps: the US change of 8 March 2026 moves nothing.
    ['2026-03-07', 2, '2026-03-09'],
    ['2026-03-09', -14, '2026-02-23'],
  ])('%s %+d days is %s', (date, days, expected) => {
    expect(addDays(date, days)).toBe(expected);
  });
});

describe('minutesIntoDay', () => {
  it.each([
    // US rule since 2007 (Energy Policy Act of 2005, IANA tz "northamerica"): EDT (UTC−4) from 8 March 2026, 02:00 local.
    ['America/New_York', '2026-03-08T06:59:00Z', 1 * 60 + 59], // 01:59 EST, one minute before the change
    ['America/New_York', '2026-03-08T07:30:00Z', 3 * 60 + 30], // 03:30 EDT: the hour 02:00–03:00 does not exist
    // India Standard Time, UTC+5:30 all year (IANA tz "asia").
    ['Asia/Kolkata', '2026-01-01T00:00:00Z', 5 * 60 + 30],
    ['UTC', '2026-12-02T23:59:00Z', 23 * 60 + 59],
    ['Mars/Olympus_Mons', '2026-12-02T10:15:00Z', 10 * 60 + 15], // unknown zone: UTC, as todayIn
  ])('%s at %s is minute %i of the day', (zone, instant, expected) => {
    expect(minutesIntoDay(zone, new Date(instant))).toBe(expected);
  });
});
