import { StyleSheet, View } from 'react-native';
import { formatQuantity } from '../../shared/calc/format';
import type { A2lAreaResult, A2lAreaStatus, MountPosition, MountSource } from '../../shared/calc/refrigerant';
import type { UnitSystem } from '../../shared/catalogue/types';
import type { SystemDetail } from '../../shared/schemas/setup';
import { colors, space } from '../theme';
import { AppText } from '../ui/AppText';
import { Badge } from '../ui/Badge';
import { SafetyCaution } from '../ui/Notice';

export const CONCENTRATION_STATUS: Record<SystemDetail['concentration']['status'], { label: string; tone: 'good' | 'bad' | 'warn' | 'info' }> = {
  pass: { label: 'Within the limit', tone: 'good' },
  fail: { label: 'Over the limit', tone: 'bad' },
  limit_not_set: { label: 'Limit not set', tone: 'warn' },
  not_measured: { label: 'Not checked yet', tone: 'info' },
  invalid: { label: 'Cannot check yet', tone: 'warn' },
};

/**
 * The A2L floor-area check's own words: below m1 there is nothing to check, and above m2 the
 * answer is neither a pass nor a fail but a question for the design (additional measures).
 */
export const A2L_AREA_STATUS: Record<A2lAreaStatus, { label: string; tone: 'good' | 'bad' | 'warn' | 'info' }> = {
  pass: { label: 'Enough floor area', tone: 'good' },
  fail: { label: 'Room too small', tone: 'bad' },
  additional_measures: { label: 'Design must show additional measures', tone: 'warn' },
  limit_not_set: { label: 'LFL not set', tone: 'warn' },
  not_measured: { label: 'Floor area not entered', tone: 'info' },
  invalid: { label: 'Cannot check yet', tone: 'warn' },
};

function a2lLabel(result: A2lAreaResult): { label: string; tone: 'good' | 'bad' | 'warn' | 'info' } {
  if (result.band === 'below_m1') return { label: 'Below m1: no room-area requirement', tone: 'good' };
  return A2L_AREA_STATUS[result.status];
}

/**
 * A system's refrigerant concentration check in plain words: which space (or joined spaces)
 * governs, the charge it allows against the system's charge, pass or fail, and the code source.
 */
export function ConcentrationResultView({ detail, unitSystem }: { detail: SystemDetail; unitSystem: UnitSystem }) {
  const c = detail.concentration;
  const status = CONCENTRATION_STATUS[c.status];
  const mass = (kg: number) => formatQuantity(kg, 'mass', unitSystem);
  return (
    <View style={styles.box} testID={`concentration-${detail.id}`}>
      <View style={styles.head}>
        <AppText variant="heading">Refrigerant concentration</AppText>
        <Badge label={status.label} tone={status.tone} testID="concentration-status" />
      </View>
      <AppText testID="concentration-message">{c.message}</AppText>
      {c.governing ? (
        <View style={styles.facts}>
          <Fact label="Governing space" value={c.governing.names.join(' + ')} testID="concentration-governing" />
          <Fact label="Its volume" value={formatQuantity(c.governing.volume, 'volume', unitSystem)} />
          <Fact label="Charge it allows" value={mass(c.governing.allowedCharge)} testID="concentration-allowed" />
          <Fact label="System charge (factory + field)" value={mass(c.totalCharge)} />
          {c.status === 'fail' ? (
            <Fact label="Over the allowed charge by" value={mass(c.totalCharge - c.governing.allowedCharge)} testID="concentration-excess" />
          ) : null}
          {c.governing.institutional ? <Fact label="Occupancy" value="Institutional: limit halved" /> : null}
        </View>
      ) : (
        <Fact label="System charge (factory + field)" value={mass(c.totalCharge)} />
      )}
      {c.limit ? (
        <AppText variant="small" muted testID="concentration-source">
          Limit {c.limit.value} {c.limit.unit}. Source: {c.limit.source}
          {c.limit.provenance === 'from memory' ? ' (from memory: confirm in the adopted edition)' : ''}.
          {c.limit.alsoPrintedIn && c.limit.alsoPrintedIn.length > 0 ? ` Also printed in ${c.limit.alsoPrintedIn.join('; ')}.` : ''}
          {c.halvingSource ? ` Halved for institutional occupancy: ${c.halvingSource}.` : ''}
        </AppText>
      ) : null}
      {detail.a2lFloorArea.length > 0 ? (
        <View style={styles.a2l}>
          <AppText variant="label">Minimum room floor area (A2L refrigerant, IEC 60335-2-40 Annex GG)</AppText>
          {detail.a2lFloorArea.map((a) => {
            const word = a2lLabel(a.result);
            return (
              <View key={a.unitId} style={styles.a2lRow} testID={`a2l-${a.tag}`}>
                <Badge label={word.label} tone={word.tone} testID={`a2l-status-${a.tag}`} />
                <AppText variant="small" style={styles.a2lText}>
                  {a.tag}
                  {a.spaceName ? ` in ${a.spaceName}` : ''} ({mountWords(a.mount, a.mountFrom)}): {a.result.message}
                </AppText>
              </View>
            );
          })}
        </View>
      ) : null}
      <SafetyCaution text="Refrigerant work (charging, recovery, brazing) is hazardous and regulated." />
    </View>
  );
}

const MOUNT_WORDS: Record<MountPosition, string> = {
  floor: 'floor-standing',
  wall: 'wall-mounted',
  ceiling: 'ceiling-mounted',
};
const MOUNT_FROM: Record<MountSource, string> = { unit: 'set on the unit', model: "from its model", kind: 'from its kind' };

function mountWords(mount: MountPosition | null, from: MountSource | null): string {
  if (mount === null) return 'mounting position not recorded';
  return `${MOUNT_WORDS[mount]}, ${from ? MOUNT_FROM[from] : ''}`.replace(/, $/, '');
}

function Fact({ label, value, testID }: { label: string; value: string; testID?: string }) {
  return (
    <View style={styles.fact}>
      <AppText variant="small" muted>
        {label}
      </AppText>
      <AppText variant="label" testID={testID}>
        {value}
      </AppText>
    </View>
  );
}

const styles = StyleSheet.create({
  box: { gap: space.sm, borderTopWidth: 1, borderTopColor: colors.line, paddingTop: space.md },
  head: { flexDirection: 'row', flexWrap: 'wrap', alignItems: 'center', gap: space.sm },
  facts: { flexDirection: 'row', flexWrap: 'wrap', gap: space.lg },
  fact: { minWidth: 140, flexShrink: 1 },
  a2l: { gap: 2 },
  a2lRow: { flexDirection: 'row', flexWrap: 'wrap', alignItems: 'center', gap: space.sm },
  a2lText: { flexShrink: 1 },
});
