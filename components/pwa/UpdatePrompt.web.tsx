import { useEffect, useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { AppText } from '../ui/AppText';
import { Button } from '../ui/Button';
import { colors, radius, space } from '../theme';
import { registerServiceWorker, type ApplyUpdate } from './register';

/**
 * Registers the service worker and, when a new version of the app has been installed behind the
 * running one, offers to reload into it. Declining leaves the page as it is; the new version
 * starts the next time the app is opened.
 */
export function UpdatePrompt() {
  const [apply, setApply] = useState<ApplyUpdate | null>(null);
  const [applying, setApplying] = useState(false);
  useEffect(() => {
    registerServiceWorker((fn) => setApply(() => fn));
  }, []);
  if (!apply) return null;
  return (
    <View style={styles.bar} role="status" testID="update-prompt">
      <AppText style={styles.text}>A new version is ready.</AppText>
      <Button
        label="Reload"
        tone="secondary"
        busy={applying}
        testID="update-reload"
        onPress={() => {
          setApplying(true);
          apply();
        }}
      />
    </View>
  );
}

const styles = StyleSheet.create({
  bar: {
    position: 'absolute',
    left: space.md,
    right: space.md,
    bottom: space.md,
    flexDirection: 'row',
    alignItems: 'center',
    justifyContent: 'space-between',
    gap: space.md,
    padding: space.md,
    borderRadius: radius.md,
    backgroundColor: colors.spruce,
  },
  text: { color: colors.paper, flexShrink: 1 },
});
