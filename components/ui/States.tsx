import type { ReactNode } from 'react';
import { ActivityIndicator, StyleSheet, View } from 'react-native';
import { colors, space } from '../theme';
import { AppText } from './AppText';
import { Button } from './Button';

export function LoadingState({ label = 'Loading…', testID = 'state-loading' }: { label?: string; testID?: string }) {
  return (
    <View style={styles.box} testID={testID} accessibilityLabel={label}>
      <ActivityIndicator color={colors.spruce} size="large" />
      <AppText muted>{label}</AppText>
    </View>
  );
}

export function ErrorState({ message, onRetry, testID = 'state-error' }: { message: string; onRetry?: () => void; testID?: string }) {
  return (
    <View style={styles.box} testID={testID} role="alert">
      <AppText variant="heading">That did not load</AppText>
      <AppText muted style={styles.center}>
        {message}
      </AppText>
      {onRetry ? <Button label="Try again" tone="secondary" onPress={onRetry} /> : null}
    </View>
  );
}

export function EmptyState({
  title,
  body,
  testID = 'state-empty',
  action,
  level,
}: {
  title: string;
  /** The title as a heading of this level (1 where the empty state is the whole screen). */
  level?: number;
  body?: string;
  testID?: string;
  /** The clear next step, e.g. a button that adds the first item. */
  action?: ReactNode;
}) {
  return (
    <View style={styles.box} testID={testID}>
      <AppText variant="heading" {...(level ? { role: 'heading' as const, 'aria-level': level } : null)}>
        {title}
      </AppText>
      {body ? (
        <AppText muted style={styles.center}>
          {body}
        </AppText>
      ) : null}
      {action ?? null}
    </View>
  );
}

const styles = StyleSheet.create({
  box: { alignItems: 'center', justifyContent: 'center', gap: space.md, paddingVertical: space.xxl, paddingHorizontal: space.lg },
  center: { textAlign: 'center' },
});
