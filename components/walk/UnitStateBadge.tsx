import { StyleSheet, View } from 'react-native';
import { UNIT_WALK_STATE_LABELS, type UnitWalkState } from '../../shared/schemas/findings';
import { SEVERITY_LABELS, type Severity } from '../../shared/words';
import { colors, radius, severityColors, space } from '../theme';
import { AppText } from '../ui/AppText';
import { SeverityShape } from './SeverityMark';

/**
 * A unit's state at a glance, by shape and word as well as colour:
 * not checked = empty ring, in progress = half-filled ring, checked OK = tick, open findings =
 * the worst severity's shape with the count.
 */
export function UnitStateBadge({
  state,
  openFindings,
  worstSeverity,
  testID,
}: {
  state: UnitWalkState;
  openFindings: number;
  worstSeverity: Severity | null;
  testID?: string;
}) {
  if (state === 'open_findings' && worstSeverity) {
    const c = severityColors[worstSeverity];
    return (
      <View style={[styles.badge, { backgroundColor: c.bg }]} testID={testID}>
        <View style={styles.well}>
          <SeverityShape severity={worstSeverity} size={14} />
        </View>
        <AppText variant="label" style={{ color: c.fg }}>
          {openFindings} open · {SEVERITY_LABELS[worstSeverity]}
        </AppText>
      </View>
    );
  }
  if (state === 'checked_ok') {
    return (
      <View style={[styles.badge, { backgroundColor: colors.goodSoft }]} testID={testID}>
        <View style={[styles.ring, { backgroundColor: colors.good, borderColor: colors.good }]}>
          <AppText style={styles.tick}>✓</AppText>
        </View>
        <AppText variant="label" style={{ color: colors.good }}>
          {UNIT_WALK_STATE_LABELS.checked_ok}
        </AppText>
      </View>
    );
  }
  if (state === 'in_progress') {
    return (
      <View style={[styles.badge, { backgroundColor: colors.ochreSoft }]} testID={testID}>
        <View style={[styles.ring, { borderColor: '#5A3B00', overflow: 'hidden' }]}>
          <View style={styles.half} />
        </View>
        <AppText variant="label" style={{ color: '#5A3B00' }}>
          {UNIT_WALK_STATE_LABELS.in_progress}
        </AppText>
      </View>
    );
  }
  return (
    <View style={[styles.badge, styles.outline]} testID={testID}>
      <View style={[styles.ring, { borderColor: colors.inkMuted }]} />
      <AppText variant="label" muted>
        {state === 'open_findings' ? `${openFindings} open` : UNIT_WALK_STATE_LABELS.not_checked}
      </AppText>
    </View>
  );
}

const styles = StyleSheet.create({
  badge: {
    flexDirection: 'row',
    alignItems: 'center',
    alignSelf: 'flex-start',
    gap: space.xs,
    borderRadius: radius.sm,
    paddingHorizontal: space.sm,
    paddingVertical: 3,
  },
  outline: { borderWidth: 1, borderColor: colors.line, backgroundColor: colors.surface },
  well: { backgroundColor: colors.surface, borderRadius: radius.sm, padding: 2 },
  ring: { width: 16, height: 16, borderRadius: 8, borderWidth: 2, alignItems: 'center', justifyContent: 'center' },
  half: { position: 'absolute', left: 0, top: 0, bottom: 0, width: 6, backgroundColor: '#5A3B00' },
  tick: { color: '#FFFFFF', fontSize: 11, lineHeight: 12, fontWeight: '700' },
});
