import { Pressable, StyleSheet, View } from 'react-native';
import { colors, fonts, radius, space, touchTarget } from '../theme';
import { AppText } from './AppText';

/** A short choice shown all at once (ft or m, lb or kg, imperial or metric). */
export function Segmented<V extends string>({
  label,
  value,
  options,
  onChange,
  testID,
}: {
  label: string;
  value: V;
  options: readonly { value: V; label: string }[];
  onChange: (value: V) => void;
  testID?: string;
}) {
  return (
    <View style={styles.wrap}>
      <AppText variant="label">{label}</AppText>
      <View style={styles.row} role="radiogroup" accessibilityLabel={label} testID={testID}>
        {options.map((o) => {
          const on = o.value === value;
          return (
            <Pressable
              key={o.value}
              role="radio"
              aria-checked={on}
              accessibilityState={{ checked: on }}
              testID={testID ? `${testID}-${o.value}` : undefined}
              onPress={() => onChange(o.value)}
              style={[styles.option, on ? styles.on : null]}
            >
              <AppText style={[styles.text, on ? styles.textOn : null]}>{o.label}</AppText>
            </Pressable>
          );
        })}
      </View>
    </View>
  );
}

const styles = StyleSheet.create({
  wrap: { gap: space.xs, marginBottom: space.lg },
  row: { flexDirection: 'row', flexWrap: 'wrap', gap: space.xs },
  option: {
    minHeight: touchTarget,
    paddingHorizontal: space.lg,
    justifyContent: 'center',
    borderRadius: radius.md,
    borderWidth: 1.5,
    borderColor: colors.line,
    backgroundColor: colors.surface,
  },
  on: { borderColor: colors.spruce, backgroundColor: colors.spruceSoft },
  text: { fontFamily: fonts.regular },
  textOn: { fontFamily: fonts.bold, color: colors.spruce },
});
