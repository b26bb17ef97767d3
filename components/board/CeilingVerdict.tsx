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
  testID,
  short,
}: {
  state: CeilingState;
  blockers: number;
  unchecked: number;
  /** Units without a unit check that a GC manager excluded from the rule: said beside "can close", so the verdict shows what it rests on. */
  excluded?: number;
  testID?: string;
  short?: boolean;
}) {
  if (state === 'ready') {
    const note = excluded > 0 ? ` (${excluded} excluded)` : '';
    return <Badge label={`${short ? '✓ Can close' : '✓ Ceilings can close'}${note}`} tone="good" testID={testID} />;
  }
  if (state === 'no_ceiling_units') return <Badge label={short ? 'No ceiling units' : 'No units in the ceiling'} testID={testID} />;
  const holds = [blockers > 0 ? `${blockers} blocking` : null, unchecked > 0 ? `${unchecked} unchecked` : null].filter(Boolean).join(' · ');
  return <Badge label={`✕ ${holds}`} tone="bad" testID={testID} />;
}
