import type { CeilingState } from '../../shared/rules/ceilings';
import { Badge } from '../ui/Badge';

/**
 * Whether a level's ceilings can close (shared/rules/ceilings.ts), in words: can close (and how
 * many units a GC manager excluded from the rule for it); not yet,
 * with what holds them (findings that need the access, units in the ceiling not checked); or
 * nothing to close, for a level without units in or above the ceiling.
 */
export function CeilingVerdict({
  state,
  blockers,
  unchecked,
  excluded = 0,
  tests = 0,
  testID,
  short,
}: {
  state: CeilingState;
  blockers: number;
  unchecked: number;
  /** Units without a unit check that a GC manager excluded from the rule: said beside "can close", so the verdict shows what it rests on. */
  excluded?: number;
  /** Test records the level waits for (missing, failed or not witnessed). */
  tests?: number;
  testID?: string;
  short?: boolean;
}) {
  if (state === 'ready') {
    const note = excluded > 0 ? ` (${excluded} excluded)` : '';
    return <Badge label={`${short ? '✓ Can close' : '✓ Ceilings can close'}${note}`} tone="good" testID={testID} />;
  }
  if (state === 'no_ceiling_units') return <Badge label={short ? 'No ceiling units' : 'No units in the ceiling'} testID={testID} />;
  const holds = [
    blockers > 0 ? `${blockers} blocking` : null,
    unchecked > 0 ? `${unchecked} unchecked` : null,
    tests > 0 ? (short ? `${tests} test${tests === 1 ? '' : 's'}` : `${tests} test${tests === 1 ? '' : 's'} to pass`) : null,
  ].filter(Boolean);
  return <Badge label={`✕ ${holds.length ? holds.join(' · ') : 'Not yet'}`} tone="bad" testID={testID} />;
}
