/**
 * The finding page of a fix submitted says how long it has waited for the inspector: whole days on
 * the job's clock since the latest fix (a fix returned and submitted again counts from the new
 * one), in the words of the board and the re-inspection queue; nothing once it is no longer waiting.
 */
import { render, screen } from '@testing-library/react-native';
import { FixWaiting } from '../../components/findings/FixWaiting';
import type { FindingEventDto } from '../../shared/schemas/findings';

const person = { id: '00000000-0000-4000-8000-0000000000b1', name: 'Rosa Lind' };
function event(kind: FindingEventDto['kind'], at: string): FindingEventDto {
  return { id: `e-${kind}-${at}`, kind, actor: person, at, from: null, to: null, reason: null, photoIds: [] };
}

/** 09:00 on 3 December 2026 in Los Angeles (17:00 UTC). */
const NOW = new Date('2026-12-03T17:00:00Z');
const LA = 'America/Los_Angeles';

describe('FixWaiting', () => {
  it.each([
    // 22:30 on 29 November in Los Angeles (06:30 UTC on the 30th): 4 days on the job's clock, 3 on UTC's.
    ['the latest fix, counted on the job’s clock', '2026-11-30T06:30:00Z', LA, 'Waiting for the inspector 4 days'],
    ['the same fix on a job in UTC', '2026-11-30T06:30:00Z', 'UTC', 'Waiting for the inspector 3 days'],
    ['a fix from yesterday', '2026-12-02T18:00:00Z', LA, 'Waiting for the inspector 1 day'],
    ['a fix from this morning', '2026-12-03T16:00:00Z', LA, 'Waiting for the inspector since today'],
  ])('%s', (_what, latestAt, timeZone, words) => {
    const events = [
      event('logged', '2026-11-10T15:00:00Z'),
      event('fix_submitted', '2026-11-20T15:00:00Z'),
      event('returned', '2026-11-22T15:00:00Z'),
      event('fix_submitted', latestAt),
    ];
    render(<FixWaiting finding={{ status: 'fix_submitted', events }} timeZone={timeZone} now={NOW} testID="finding-waiting" />);
    expect(screen.getByTestId('finding-waiting')).toHaveTextContent(words);
  });

  it('says nothing for a finding that is open again or closed', () => {
    const events = [event('logged', '2026-11-10T15:00:00Z'), event('fix_submitted', '2026-11-20T15:00:00Z'), event('returned', '2026-11-22T15:00:00Z')];
    const { rerender } = render(<FixWaiting finding={{ status: 'open', events }} timeZone={LA} now={NOW} testID="finding-waiting" />);
    expect(screen.queryByTestId('finding-waiting')).toBeNull();
    rerender(<FixWaiting finding={{ status: 'closed', events: [...events, event('fix_submitted', '2026-11-25T15:00:00Z'), event('accepted', '2026-11-26T15:00:00Z')] }} timeZone={LA} now={NOW} testID="finding-waiting" />);
    expect(screen.queryByTestId('finding-waiting')).toBeNull();
  });
});
