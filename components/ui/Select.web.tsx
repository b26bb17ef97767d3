import { createElement } from 'react';
import { StyleSheet, View } from 'react-native';
import { colors, fonts, radius, space, touchTarget } from '../theme';
import { AppText } from './AppText';
import type { SelectProps } from './Select.types';

export type { SelectOption, SelectProps } from './Select.types';

/** On the web: the browser's own <select>, which is keyboard- and screen-reader-friendly for free. */
export function Select({ label, value, options, onChange, placeholder, error, hint, testID, disabled, compact, fieldRef }: SelectProps) {
  return (
    <View style={[styles.wrap, compact ? null : styles.spaced]}>
      <AppText variant="label">{label}</AppText>
      {createElement(
        'select',
        {
          'data-testid': testID,
          // The <select> itself: focusing it scrolls it into view and lets the keyboard choose at once.
          ref: fieldRef,
          'aria-label': label,
          'aria-invalid': error ? true : undefined,
          value,
          disabled,
          onChange: (e: { target: { value: string } }) => onChange(e.target.value),
          style: {
            minHeight: touchTarget + 4,
            borderWidth: 1.5,
            borderStyle: 'solid',
            borderColor: error ? colors.danger : colors.line,
            borderRadius: radius.md,
            backgroundColor: colors.surface,
            paddingLeft: space.md,
            paddingRight: space.md,
            fontFamily: fonts.regular,
            fontSize: 17,
            color: colors.ink,
            width: '100%',
          },
        },
        placeholder !== undefined ? createElement('option', { key: '', value: '' }, placeholder) : null,
        options.map((o) => createElement('option', { key: o.value, value: o.value }, o.label)),
      )}
      {error ? (
        <AppText variant="small" style={styles.error} role="alert" testID={testID ? `${testID}-error` : undefined}>
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
  error: { color: colors.danger },
});
