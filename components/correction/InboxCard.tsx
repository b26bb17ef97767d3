import { Link } from 'expo-router';
import { Pressable, StyleSheet, View } from 'react-native';
import type { InboxItem } from '../../shared/schemas/findings';
import { formatDay } from '../findings/due';
import { StatusBadge, findingPlace } from '../findings/FindingCard';
import { colors, radius, space, touchTarget } from '../theme';
import { AppText } from '../ui/AppText';
import { SeverityMark } from '../walk/SeverityMark';
import { links } from '../links';

/**
 * One finding in a subcontractor's inbox: where (tag, space, level), the defect, severity (shape
 * and word), due or overdue, and why it came back when a re-inspection returned it.
 */
export function InboxCard({ item, showJob, showPlace = true }: { item: InboxItem; showJob: boolean; showPlace?: boolean }) {
  const f = item;
  const returned = f.status === 'open' && f.returnCount > 0;
  return (
    <Link href={links.finding(f.jobId, f.id)} asChild>
      <Pressable
        style={StyleSheet.flatten([styles.card, f.overdue ? styles.overdueCard : null])}
        testID={`inbox-card-${f.number}`}
        accessibilityRole="link"
      >
        <View style={styles.top}>
          <AppText variant="label" numberOfLines={2} style={styles.place}>
            {f.unitTag ?? f.label}
            {showPlace ? ` · ${findingPlace({ ...f, unitTag: null })}` : f.unitTag ? ` · ${f.label}` : ''}
          </AppText>
          <StatusBadge status={f.status} />
        </View>
        <AppText variant="heading" numberOfLines={2}>
          {f.title}
        </AppText>
        {showJob ? (
          <AppText variant="small" muted numberOfLines={1}>
            {f.jobName}
          </AppText>
        ) : null}
        <View style={styles.meta}>
          <SeverityMark severity={f.severity} />
          <AppText variant="small" style={f.overdue ? styles.overdue : null} testID={`inbox-card-${f.number}-due`}>
            {f.overdue ? '⚠ Overdue since ' : 'Due '}
            {formatDay(f.dueOn)}
          </AppText>
        </View>
        {returned ? (
          <View style={styles.returned} testID={`inbox-card-${f.number}-returned`}>
            <AppText variant="small" style={styles.returnedText}>
              ↩ Returned{f.lastReturnReason ? `: ${f.lastReturnReason}` : ''}
            </AppText>
          </View>
        ) : null}
      </Pressable>
    </Link>
  );
}

const styles = StyleSheet.create({
  card: {
    minHeight: touchTarget + 40,
    gap: 4,
    backgroundColor: colors.surface,
    borderRadius: radius.md,
    borderWidth: 1,
    borderColor: colors.line,
    borderLeftWidth: 6,
    borderLeftColor: colors.spruce,
    padding: space.md,
  },
  overdueCard: { borderLeftColor: colors.danger },
  top: { flexDirection: 'row', justifyContent: 'space-between', alignItems: 'flex-start', gap: space.sm },
  place: { flexShrink: 1 },
  meta: { flexDirection: 'row', alignItems: 'center', gap: space.sm, flexWrap: 'wrap' },
  overdue: { color: colors.danger, fontWeight: '700' },
  returned: { backgroundColor: colors.dangerSoft, borderRadius: radius.sm, paddingHorizontal: space.sm, paddingVertical: 4 },
  returnedText: { color: colors.danger },
});
