import { StyleSheet, View } from 'react-native';
import { colors, radius, space } from '../theme';
import { AppText } from './AppText';

type Tone = 'neutral' | 'good' | 'bad' | 'warn' | 'info';

const palette: Record<Tone, { bg: string; fg: string }> = {
  neutral: { bg: colors.spruceSoft, fg: colors.spruce },
  good: { bg: colors.goodSoft, fg: colors.good },
  bad: { bg: colors.dangerSoft, fg: colors.danger },
  warn: { bg: colors.ochreSoft, fg: '#5A3B00' },
  info: { bg: '#E3ECF6', fg: colors.focus },
};

/** A short label on a tinted ground. The word carries the meaning; colour only supports it. */
export function Badge({ label, tone = 'neutral', testID }: { label: string; tone?: Tone; testID?: string }) {
  const c = palette[tone];
  return (
    <View style={[styles.badge, { backgroundColor: c.bg }]} testID={testID}>
      <AppText variant="label" style={{ color: c.fg }}>
        {label}
      </AppText>
    </View>
  );
}

const styles = StyleSheet.create({
  badge: { alignSelf: 'flex-start', borderRadius: radius.sm, paddingHorizontal: space.sm, paddingVertical: 2 },
});
