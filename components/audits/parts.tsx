import { StyleSheet, View } from 'react-native';
import { DECISION_LABELS, type AuditDecision } from '../../shared/calc/sampling';
import { colors, radius, space } from '../theme';
import { AppText } from '../ui/AppText';

const DECISION_LOOK: Record<AuditDecision, { bg: string; fg: string; mark: string }> = {
  accept: { bg: colors.goodSoft, fg: colors.good, mark: '✓' },
  reject: { bg: colors.dangerSoft, fg: colors.danger, mark: '✕' },
  continue: { bg: colors.spruceSoft, fg: colors.spruce, mark: '…' },
  expand: { bg: colors.ochreSoft, fg: colors.ink, mark: '＋' },
};

/** The decision as a word with a mark (never colour alone). */
export function DecisionBadge({ decision, testID }: { decision: AuditDecision; testID?: string }) {
  const look = DECISION_LOOK[decision];
  return (
    <View style={[styles.badge, { backgroundColor: look.bg }]} testID={testID}>
      <AppText variant="label" style={{ color: look.fg }}>
        {look.mark} {DECISION_LABELS[decision]}
      </AppText>
    </View>
  );
}

/** "Audit 2" */
export const auditTitle = (a: { number: number; name: string }) => `Audit ${a.number} · ${a.name}`;

const styles = StyleSheet.create({
  badge: { alignSelf: 'flex-start', paddingHorizontal: space.sm, paddingVertical: 2, borderRadius: radius.sm },
});
