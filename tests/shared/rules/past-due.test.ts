/**
 * The due-date rules both sides apply: a date before today is refused unless a GC manager
 * back-dates it (the flag from anyone else is refused whatever the date), and the words a returned
 * fix shows for its new due date.
 */
import { dueAgainWords } from '../../../shared/rules/dueAgain';
import { BACKDATE_FORBIDDEN_MESSAGE, dueOnProblem, pastDueMessage } from '../../../shared/rules/pastDue';

const today = '2026-12-03';

describe('dueOnProblem', () => {
  it.each([
    // dueOn, backdated, role, expected
    ['2026-12-03', undefined, 'inspector', null],
    ['2026-12-04', undefined, 'inspector', null],
    ['2026-12-02', undefined, 'inspector', 'past'],
    ['2026-12-02', undefined, 'gc_manager', 'past'],
    ['2026-12-02', true, 'gc_manager', null],
    ['2026-12-10', true, 'gc_manager', null],
    ['2026-12-02', true, 'inspector', 'forbidden'],
    ['2026-12-10', true, 'inspector', 'forbidden'],
    ['2026-12-10', true, 'subcontractor', 'forbidden'],
    ['2026-12-02', false, 'gc_manager', 'past'],
  ] as const)('%s backdated=%s by %s → %s', (dueOn, backdated, role, expected) => {
    expect(dueOnProblem({ dueOn, backdated, role, today })?.kind ?? null).toBe(expected);
  });

  it('names today in its message', () => {
    expect(dueOnProblem({ dueOn: '2026-11-30', role: 'inspector', today })).toEqual({ kind: 'past', message: pastDueMessage(today) });
    expect(pastDueMessage(today)).toBe("The due date is before today (2026-12-03 on this job's clock). Choose today or a later date.");
    expect(dueOnProblem({ dueOn: '2026-11-30', backdated: true, role: 'inspector', today })!.message).toBe(BACKDATE_FORBIDDEN_MESSAGE);
  });
});

describe('dueAgainWords', () => {
  it('says the new date and the days counted for the severity', () => {
    expect(dueAgainWords({ status: 'open', dueOn: '2026-12-10', daysToFix: 7 }, 'major')).toBe('Due again on 2026-12-10 (7 days for a major finding)');
    expect(dueAgainWords({ dueOn: '2026-12-04', daysToFix: 1 }, 'critical', (d) => `day ${d}`)).toBe('Due again on day 2026-12-04 (1 day for a critical finding)');
  });
  it('says nothing for a return recorded before returns set a due date', () => {
    expect(dueAgainWords({ status: 'open', returnCount: 1 }, 'minor')).toBeNull();
    expect(dueAgainWords(null, 'minor')).toBeNull();
  });
});
