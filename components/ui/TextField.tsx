import { forwardRef } from 'react';
import { StyleSheet, TextInput, View, type TextInputProps } from 'react-native';
import type { TextLimit } from '../../shared/schemas/fields';
import { colors, fonts, radius, space, touchTarget } from '../theme';
import { AppText } from './AppText';

/** From this share of its limit on, a text box says how many characters are left. */
export const LIMIT_WARN_SHARE = 0.8;

// maxLength is left out on purpose: it cuts what a person types or pastes without a word. A text
// box with a limit takes `limit` (from the shared schema) and counts down to it instead.
export interface TextFieldProps extends Omit<TextInputProps, 'maxLength'> {
  label: string;
  error?: string;
  hint?: string;
  /** Drop the bottom margin (inline in a row of filters). */
  compact?: boolean;
  /** The schema's length limit: "N characters left" near it, the schema's own words past it. */
  limit?: TextLimit;
}

/** What a text box with a limit says about its length: the counter's words, and the error once past it. */
export function limitState(value: string | undefined, limit: TextLimit | undefined): { counter: string; over: string | undefined } {
  if (!limit) return { counter: '', over: undefined };
  // Counted as the schema counts it: the text as sent, without surrounding spaces.
  const length = (value ?? '').trim().length;
  if (length > limit.max) return { counter: '', over: limit.tooLong(length) };
  if (length < Math.ceil(limit.max * LIMIT_WARN_SHARE)) return { counter: '', over: undefined };
  const left = limit.max - length;
  if (left === 0) return { counter: `You have reached the limit of ${limit.max.toLocaleString('en-US')} characters.`, over: undefined };
  return { counter: `${left.toLocaleString('en-US')} character${left === 1 ? '' : 's'} left`, over: undefined };
}

/** A labelled input; its error is announced and shown under it. */
export const TextField = forwardRef<TextInput, TextFieldProps>(function TextField(
  { label, error, hint, style, testID, compact, limit, ...rest },
  ref,
) {
  const { counter, over } = limitState(rest.value, limit);
  const shownError = error ?? over;
  return (
    <View style={[styles.wrap, compact ? styles.compact : null]}>
      <AppText variant="label" nativeID={testID ? `${testID}-label` : undefined}>
        {label}
      </AppText>
      <TextInput
        ref={ref}
        testID={testID}
        accessibilityLabel={label}
        aria-invalid={shownError ? true : undefined}
        placeholderTextColor={colors.inkFaint}
        style={[styles.input, shownError ? styles.inputError : null, style]}
        {...rest}
      />
      {shownError ? (
        <AppText variant="small" style={styles.error} role="alert" testID={testID ? `${testID}-error` : undefined}>
          {shownError}
        </AppText>
      ) : hint ? (
        <AppText variant="small" muted>
          {hint}
        </AppText>
      ) : null}
      {limit ? (
        // Always there (empty while far from the limit), so a screen reader hears it change.
        <AppText
          variant="small"
          muted
          aria-live="polite"
          accessibilityLiveRegion="polite"
          testID={testID ? `${testID}-counter` : undefined}
          style={counter ? null : styles.quiet}
        >
          {counter}
        </AppText>
      ) : null}
    </View>
  );
});

const styles = StyleSheet.create({
  wrap: { gap: space.xs, marginBottom: space.lg },
  compact: { marginBottom: 0 },
  input: {
    minHeight: touchTarget + 4,
    borderWidth: 1.5,
    borderColor: colors.line,
    borderRadius: radius.md,
    backgroundColor: colors.surface,
    paddingHorizontal: space.md,
    fontFamily: fonts.regular,
    fontSize: 17,
    color: colors.ink,
  },
  inputError: { borderColor: colors.danger },
  error: { color: colors.danger },
  // An empty live region takes no room.
  quiet: { height: 0, marginTop: -space.xs },
});
