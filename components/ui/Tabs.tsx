import { Link, type Href } from 'expo-router';
import { useRef } from 'react';
import { Pressable, ScrollView, StyleSheet } from 'react-native';
import { colors, radius, space, touchTarget } from '../theme';
import { AppText } from './AppText';

export interface TabItem {
  key: string;
  label: string;
  href: Href;
}

/** A row of links between sibling sections; it scrolls sideways on a phone. */
export function Tabs({ items, current, testID }: { items: readonly TabItem[]; current: string; testID?: string }) {
  const scroller = useRef<ScrollView>(null);
  return (
    <ScrollView ref={scroller} horizontal showsHorizontalScrollIndicator={false} testID={testID} contentContainerStyle={styles.row}>
      {items.map((item) => {
        const on = item.key === current;
        return (
          <Link key={item.key} href={item.href} asChild>
            <Pressable
              accessibilityRole="link"
              aria-current={on ? 'page' : undefined}
              testID={testID ? `${testID}-${item.key}` : undefined}
              // On a phone the current section may sit past the right edge: bring it into view.
              onLayout={on ? (e) => scroller.current?.scrollTo({ x: Math.max(0, e.nativeEvent.layout.x - space.lg), animated: false }) : undefined}
              // One flat object: Link asChild spreads the child's style, and a spread array crashes on the web.
              style={StyleSheet.flatten([styles.tab, on ? styles.on : null])}
            >
              <AppText variant="label" style={{ color: on ? colors.paper : colors.spruce }}>
                {item.label}
              </AppText>
            </Pressable>
          </Link>
        );
      })}
    </ScrollView>
  );
}

const styles = StyleSheet.create({
  row: { gap: space.xs, paddingVertical: 2 },
  tab: {
    minHeight: touchTarget,
    justifyContent: 'center',
    paddingHorizontal: space.md,
    borderRadius: radius.md,
    borderWidth: 1.5,
    borderColor: colors.spruce,
    backgroundColor: colors.surface,
  },
  on: { backgroundColor: colors.spruce },
});
