import { StyleSheet, View } from 'react-native';
import { FINDING_STATUS_LABELS, SEVERITIES, SEVERITY_LABELS } from '../../shared/words';
import { space } from '../theme';
import { AppText } from '../ui/AppText';
import { FindingPinMark, UnitPinMark } from './PinMark';

const STATUSES = ['open', 'fix_submitted', 'closed'] as const;

/** What the pins mean: fill = status, shape = severity, halo = overdue, ring = unit. */
export function PlanLegend() {
  return (
    <View style={styles.box} testID="plan-legend" accessibilityLabel="Legend of the plan pins">
      <View style={styles.group}>
        <AppText variant="label" muted>
          Fill: status
        </AppText>
        {STATUSES.map((s) => (
          <View key={s} style={styles.item}>
            <FindingPinMark status={s} severity="minor" size={22} />
            <AppText variant="small">{FINDING_STATUS_LABELS[s]}</AppText>
          </View>
        ))}
      </View>
      <View style={styles.group}>
        <AppText variant="label" muted>
          Shape: severity
        </AppText>
        {SEVERITIES.map((s) => (
          <View key={s} style={styles.item}>
            <FindingPinMark status="open" severity={s} size={22} />
            <AppText variant="small">{SEVERITY_LABELS[s]}</AppText>
          </View>
        ))}
      </View>
      <View style={styles.group}>
        <View style={styles.item}>
          <FindingPinMark status="open" severity="major" overdue size={22} />
          <AppText variant="small">Ochre halo: overdue</AppText>
        </View>
        <View style={styles.item}>
          <UnitPinMark size={20} />
          <AppText variant="small">Unit</AppText>
        </View>
      </View>
    </View>
  );
}

const styles = StyleSheet.create({
  box: { flexDirection: 'row', flexWrap: 'wrap', columnGap: space.xl, rowGap: space.sm },
  group: { flexDirection: 'row', flexWrap: 'wrap', alignItems: 'center', columnGap: space.md, rowGap: space.xs },
  item: { flexDirection: 'row', alignItems: 'center', gap: space.xs },
});
