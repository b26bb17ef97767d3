import { StyleSheet, View } from 'react-native';
import { colors, fonts } from '../theme';
import { AppText } from './AppText';

/** The product's name set in type, with its ochre dot: a finding, marked. */
export function Wordmark({ compact }: { compact?: boolean }) {
  const size = compact ? 20 : 30;
  return (
    <View style={styles.row} role="img" aria-label="Trimout">
      <AppText style={[styles.word, { fontSize: size, lineHeight: size * 1.2 }]} aria-hidden>
        trimout
      </AppText>
      <View style={[styles.dot, { width: size * 0.28, height: size * 0.28, borderRadius: size }]} />
    </View>
  );
}

const styles = StyleSheet.create({
  row: { flexDirection: 'row', alignItems: 'flex-end', gap: 3 },
  word: { fontFamily: fonts.bold, color: colors.spruce, letterSpacing: -0.5 },
  dot: { backgroundColor: colors.ochre, marginBottom: 6 },
});
