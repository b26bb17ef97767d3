import { StyleSheet, View } from 'react-native';
import { useAuditsQuery } from '../queries/audits';
import { colors, radius, space } from '../theme';
import { AppText } from '../ui/AppText';

/**
 * On a walk screen's unit row: "Audit 2 sample" while the unit is in an open audit's sample, "Audit
 * 2: check" while a rejected audit's follow-up still needs it. One query per level (the rows share
 * it); nothing is shown while it loads, fails or is refused.
 */
export function AuditUnitMark({ jobId, levelId, unitId, testID }: { jobId: string; levelId: string; unitId: string; testID: string }) {
  const audits = useAuditsQuery(jobId, { levelId });
  const marks = audits.data?.unitMarks?.filter((m) => m.unitId === unitId) ?? [];
  if (marks.length === 0) return null;
  return (
    <View style={styles.row} testID={testID}>
      {marks.map((m) => (
        <View key={m.auditId} style={[styles.badge, m.mark === 'check_all' ? styles.checkAll : null]}>
          <AppText variant="label" style={{ color: m.mark === 'check_all' ? colors.danger : colors.ink }}>
            {m.mark === 'sample' ? `◆ Audit ${m.number} sample` : `◆ Audit ${m.number}: check every unit`}
          </AppText>
        </View>
      ))}
    </View>
  );
}

const styles = StyleSheet.create({
  row: { flexDirection: 'row', flexWrap: 'wrap', gap: space.xs },
  badge: { alignSelf: 'flex-start', backgroundColor: colors.ochreSoft, borderRadius: radius.sm, paddingHorizontal: space.sm, paddingVertical: 2 },
  checkAll: { backgroundColor: colors.dangerSoft },
});
