import type { ReactNode } from 'react';
import { Pressable, StyleSheet, View } from 'react-native';
import { colors, space, touchTarget } from '../theme';
import { AppText } from '../ui/AppText';

/**
 * A card with a tick box beside it, for choosing several on a phone (the wide table has its own
 * column of boxes). The box is a full touch target; the card keeps its own link.
 */
export function PickRow({ label, checked, onToggle, children, testID }: { label: string; checked: boolean; onToggle: () => void; children: ReactNode; testID?: string }) {
  return (
    <View style={styles.row}>
      <Pressable role="checkbox" aria-checked={checked} accessibilityLabel={`Choose ${label}`} onPress={onToggle} style={styles.hit} testID={testID}>
        <View style={[styles.box, checked && styles.on]}>{checked ? <AppText style={styles.tick}>✓</AppText> : null}</View>
      </Pressable>
      <View style={styles.card}>{children}</View>
    </View>
  );
}

const styles = StyleSheet.create({
  row: { flexDirection: 'row', alignItems: 'center', gap: space.xs },
  hit: { width: touchTarget, minHeight: touchTarget, alignItems: 'center', justifyContent: 'center' },
  box: { width: 28, height: 28, borderRadius: 6, borderWidth: 2, borderColor: colors.spruce, alignItems: 'center', justifyContent: 'center', backgroundColor: colors.surface },
  on: { backgroundColor: colors.spruce },
  tick: { color: '#FFFFFF', fontSize: 18, lineHeight: 22 },
  card: { flex: 1 },
});
