import { Pressable, StyleSheet, View } from 'react-native';
import { SEVERITIES, SEVERITY_LABELS, type Severity } from '../../shared/words';
import { colors, fonts, radius, severityColors, space, touchTarget } from '../theme';
import { AppText } from '../ui/AppText';
import { SeverityShape } from '../walk/SeverityMark';

/** Three big choices, each with its shape and word; the chosen one takes the severity's colour. */
export function SeverityPicker({ value, onChange, testID = 'severity' }: { value: Severity; onChange: (s: Severity) => void; testID?: string }) {
  return (
    <View style={styles.wrap}>
      <AppText variant="label">Severity</AppText>
      <View style={styles.row} role="radiogroup" accessibilityLabel="Severity">
        {SEVERITIES.map((s) => {
          const on = s === value;
          return (
            <Pressable
              key={s}
              role="radio"
              aria-checked={on}
              accessibilityState={{ checked: on }}
              testID={`${testID}-${s}`}
              onPress={() => onChange(s)}
              style={[styles.option, on ? { backgroundColor: severityColors[s].bg, borderColor: colors.ink } : null]}
            >
              <View style={styles.well}>
                <SeverityShape severity={s} size={16} />
              </View>
              <AppText style={[styles.text, on ? { color: severityColors[s].fg, fontFamily: fonts.bold } : null]}>{SEVERITY_LABELS[s]}</AppText>
            </Pressable>
          );
        })}
      </View>
    </View>
  );
}

const styles = StyleSheet.create({
  wrap: { gap: space.xs },
  row: { flexDirection: 'row', gap: space.sm },
  option: {
    flex: 1,
    minHeight: touchTarget + 8,
    flexDirection: 'row',
    alignItems: 'center',
    justifyContent: 'center',
    gap: space.xs,
    borderRadius: radius.md,
    borderWidth: 1.5,
    borderColor: colors.line,
    backgroundColor: colors.surface,
    paddingHorizontal: space.xs,
  },
  well: { backgroundColor: colors.surface, borderRadius: radius.sm, padding: 2 },
  text: { fontFamily: fonts.regular, fontSize: 16 },
});
