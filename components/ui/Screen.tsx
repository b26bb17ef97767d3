import type { ReactNode } from 'react';
import { ScrollView, StyleSheet, View } from 'react-native';
import { colors, contentMaxWidth, space } from '../theme';

/** A scrolling page on paper, its content centred and never wider than a comfortable reading width. */
export function Screen({ children, testID, maxWidth = contentMaxWidth }: { children: ReactNode; testID?: string; maxWidth?: number }) {
  return (
    <ScrollView style={styles.scroll} contentContainerStyle={styles.content} testID={testID}>
      <View style={[styles.column, { maxWidth }]}>{children}</View>
    </ScrollView>
  );
}

const styles = StyleSheet.create({
  scroll: { flex: 1, backgroundColor: colors.paper },
  content: { paddingHorizontal: space.lg, paddingVertical: space.xl, alignItems: 'center' },
  column: { width: '100%', gap: space.lg },
});
