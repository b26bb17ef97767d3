import { Link } from 'expo-router';
import { StyleSheet, View } from 'react-native';
import { useSessionQuery, useSignOutMutation } from '../queries/session';
import { colors, contentMaxWidth, space } from '../theme';
import { AppText } from './AppText';
import { Button } from './Button';
import { Wordmark } from './Wordmark';
import { links } from '../links';

export function AppHeader() {
  const session = useSessionQuery();
  const signOut = useSignOutMutation();
  const user = session.data?.user;
  return (
    <View style={styles.bar} testID="app-header">
      <View style={styles.inner}>
        <Link href={links.home()} accessibilityLabel="Your jobs">
          <Wordmark compact />
        </Link>
        <View style={styles.right}>
          {user ? (
            <View style={styles.who}>
              <AppText variant="label" numberOfLines={1} testID="header-user-name">
                {user.name}
              </AppText>
              <AppText variant="small" muted numberOfLines={1}>
                {user.company.name}
              </AppText>
            </View>
          ) : null}
          {user ? (
            <Link href={links.preferences()} accessibilityLabel="Mail preferences" testID="header-preferences" style={styles.prefs}>
              <AppText variant="label" style={styles.prefsText}>
                Mail
              </AppText>
            </Link>
          ) : null}
          <Button
            testID="sign-out"
            label="Sign out"
            tone="quiet"
            busy={signOut.isPending}
            onPress={() => signOut.mutate()}
          />
        </View>
      </View>
    </View>
  );
}

const styles = StyleSheet.create({
  bar: { backgroundColor: colors.surface, borderBottomWidth: 1, borderBottomColor: colors.line, alignItems: 'center' },
  inner: {
    width: '100%',
    maxWidth: contentMaxWidth + 2 * space.lg,
    paddingHorizontal: space.lg,
    paddingVertical: space.sm,
    flexDirection: 'row',
    alignItems: 'center',
    justifyContent: 'space-between',
    gap: space.md,
  },
  right: { flexDirection: 'row', alignItems: 'center', gap: space.sm, flexShrink: 1 },
  who: { alignItems: 'flex-end', flexShrink: 1 },
  prefs: { paddingHorizontal: space.sm, paddingVertical: space.sm },
  prefsText: { color: colors.spruce, textDecorationLine: 'underline' },
});
