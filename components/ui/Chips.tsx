import { Pressable, StyleSheet, View } from 'react-native';
import { choiceChip, colors, fonts, space } from '../theme';
import { AppText } from './AppText';

/** Several choices at once (trades, unit kinds): each chip toggles; the check mark says it is on. */
export function Chips<V extends string>({
  label,
  values,
  options,
  onChange,
  error,
  testID,
}: {
  label: string;
  values: readonly V[];
  options: readonly { value: V; label: string }[];
  onChange: (values: V[]) => void;
  error?: string;
  testID?: string;
}) {
  return (
    <View style={styles.wrap}>
      <AppText variant="label">{label}</AppText>
      <View style={styles.row} testID={testID}>
        {options.map((o) => {
          const on = values.includes(o.value);
          return (
            <Pressable
              key={o.value}
              role="checkbox"
              aria-checked={on}
              accessibilityState={{ checked: on }}
              testID={testID ? `${testID}-${o.value}` : undefined}
              onPress={() => onChange(on ? values.filter((v) => v !== o.value) : [...values, o.value])}
              style={[styles.chip, on ? styles.on : null]}
            >
              <AppText style={[styles.text, on ? styles.textOn : null]}>
                {on ? '✓ ' : ''}
                {o.label}
              </AppText>
            </Pressable>
          );
        })}
      </View>
      {error ? (
        <AppText variant="small" style={styles.error} role="alert">
          {error}
        </AppText>
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({
  wrap: { gap: space.xs, marginBottom: space.lg },
  row: { flexDirection: 'row', flexWrap: 'wrap', gap: space.xs },
  chip: choiceChip,
  on: { borderColor: colors.spruce, backgroundColor: colors.spruceSoft },
  text: { fontFamily: fonts.regular, fontSize: 15 },
  textOn: { fontFamily: fonts.bold, color: colors.spruce },
  error: { color: colors.danger },
});
