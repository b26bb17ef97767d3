import type { ReactNode } from 'react';
import { ScrollView, StyleSheet, View } from 'react-native';
import { colors, contentMaxWidth, space } from '../theme';

/**
 * A scrolling page on paper, its content centred and never wider than a comfortable reading width.
 * `main`: the page is the screen's main landmark itself (screens outside the signed-in area, whose
 * layout gives the main landmark to every screen in it). Set per screen, not by the root layout:
 * a root layout reading the route to decide sent a sign-in or an invitation back to the home page.
 */
export function Screen({ children, testID, maxWidth = contentMaxWidth, main }: { children: ReactNode; testID?: string; maxWidth?: number; main?: boolean }) {
  return (
    <ScrollView style={styles.scroll} contentContainerStyle={styles.content} testID={testID}>
      <View style={[styles.column, { maxWidth }]} role={main ? 'main' : undefined}>
        {children}
      </View>
    </ScrollView>
  );
}

const styles = StyleSheet.create({
  scroll: { flex: 1, backgroundColor: colors.paper },
  content: { paddingHorizontal: space.lg, paddingVertical: space.xl, alignItems: 'center' },
  column: { width: '100%', gap: space.lg },
});
