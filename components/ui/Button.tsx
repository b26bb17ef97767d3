import { ActivityIndicator, Pressable, StyleSheet, Text, type PressableProps } from 'react-native';
import { colors, fonts, radius, space, touchTarget } from '../theme';

type Tone = 'primary' | 'secondary' | 'quiet' | 'danger';

export interface ButtonProps extends Omit<PressableProps, 'children'> {
  label: string;
  tone?: Tone;
  busy?: boolean;
}

export function Button({ label, tone = 'primary', busy, disabled, style, ...rest }: ButtonProps) {
  const palette = tones[tone];
  // A leading symbol ("✓ Accept fix") is decoration, hidden from assistive technology: the name is
  // the words, and a label that adds what the button acts on starts with them ("Accept fix — #12").
  const [, symbol, words] = /^([^\p{L}\p{N}\s]+)\s+(.+)$/u.exec(label) ?? [null, null, label];
  return (
    <Pressable
      accessibilityRole="button"
      accessibilityState={{ disabled: Boolean(disabled || busy), busy: Boolean(busy) }}
      disabled={disabled || busy}
      style={(state) => [
        styles.base,
        { backgroundColor: palette.bg, borderColor: palette.border },
        state.pressed && styles.pressed,
        (disabled || busy) && styles.disabled,
        typeof style === 'function' ? style(state) : style,
      ]}
      {...rest}
    >
      {busy ? <ActivityIndicator color={palette.fg} style={styles.spinner} /> : null}
      <Text style={[styles.label, { color: palette.fg }]}>
        {symbol ? <Text aria-hidden>{`${symbol} `}</Text> : null}
        {words}
      </Text>
    </Pressable>
  );
}

const tones: Record<Tone, { bg: string; fg: string; border: string }> = {
  primary: { bg: colors.spruce, fg: colors.paper, border: colors.spruce },
  secondary: { bg: colors.surface, fg: colors.spruce, border: colors.spruce },
  quiet: { bg: 'transparent', fg: colors.spruce, border: 'transparent' },
  danger: { bg: colors.danger, fg: '#FFFFFF', border: colors.danger },
};

const styles = StyleSheet.create({
  base: {
    minHeight: touchTarget,
    paddingHorizontal: space.lg,
    borderRadius: radius.md,
    borderWidth: 1.5,
    alignItems: 'center',
    justifyContent: 'center',
    flexDirection: 'row',
  },
  pressed: { opacity: 0.85 },
  disabled: { opacity: 0.55 },
  spinner: { marginRight: space.sm },
  label: { fontFamily: fonts.bold, fontSize: 16 },
});
