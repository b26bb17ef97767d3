import { useImperativeHandle, useState } from 'react';
import { Pressable, StyleSheet, View } from 'react-native';
import { colors, fonts, radius, space, touchTarget } from '../theme';
import { AppText } from './AppText';
import type { SelectProps } from './Select.types';

export type { SelectOption, SelectProps } from './Select.types';

/** On phones: a field that opens its list of choices in place. */
export function Select({ label, value, options, onChange, placeholder, error, hint, testID, disabled, compact, fieldRef }: SelectProps) {
  const [open, setOpen] = useState(false);
  // A form focusing the first field in error stops here (nothing after it takes the focus); the list
  // stays as the person left it, so the next press opens it rather than closing it.
  useImperativeHandle(fieldRef, () => ({ focus: () => undefined }), []);
  const current = options.find((o) => o.value === value)?.label ?? placeholder ?? 'Choose…';
  const all = placeholder !== undefined ? [{ value: '', label: placeholder }, ...options] : options;
  return (
    <View style={[styles.wrap, compact ? null : styles.spaced]}>
      <AppText variant="label">{label}</AppText>
      <Pressable
        testID={testID}
        accessibilityRole="button"
        accessibilityLabel={`${label}: ${current}`}
        accessibilityState={{ expanded: open, disabled }}
        disabled={disabled}
        onPress={() => setOpen((o) => !o)}
        style={[styles.field, error ? styles.fieldError : null]}
      >
        <AppText style={styles.value}>{current}</AppText>
        <AppText muted>{open ? '▲' : '▼'}</AppText>
      </Pressable>
      {open ? (
        <View style={styles.list}>
          {all.map((o) => (
            <Pressable
              key={o.value}
              accessibilityRole="button"
              accessibilityState={{ selected: o.value === value }}
              onPress={() => {
                onChange(o.value);
                setOpen(false);
              }}
              style={[styles.option, o.value === value ? styles.optionOn : null]}
            >
              <AppText>{o.label}</AppText>
            </Pressable>
          ))}
        </View>
      ) : null}
      {error ? (
        <AppText variant="small" style={styles.error} role="alert">
          {error}
        </AppText>
      ) : hint ? (
        <AppText variant="small" muted>
          {hint}
        </AppText>
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({
  wrap: { gap: space.xs },
  spaced: { marginBottom: space.lg },
  field: {
    minHeight: touchTarget + 4,
    borderWidth: 1.5,
    borderColor: colors.line,
    borderRadius: radius.md,
    backgroundColor: colors.surface,
    paddingHorizontal: space.md,
    flexDirection: 'row',
    alignItems: 'center',
    justifyContent: 'space-between',
    gap: space.sm,
  },
  fieldError: { borderColor: colors.danger },
  value: { fontFamily: fonts.regular, fontSize: 17, flexShrink: 1 },
  list: { borderWidth: 1, borderColor: colors.line, borderRadius: radius.md, backgroundColor: colors.surface, overflow: 'hidden' },
  option: { minHeight: touchTarget, justifyContent: 'center', paddingHorizontal: space.md, borderBottomWidth: 1, borderBottomColor: colors.line },
  optionOn: { backgroundColor: colors.spruceSoft },
  error: { color: colors.danger },
});
