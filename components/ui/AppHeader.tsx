import { Link } from 'expo-router';
import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { currentOutbox } from '../outbox';
import { OfflineBanner, OutboxCountLink, SignOutConfirm } from '../outbox/HeaderParts';
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
  // Work not sent yet: signing out asks first (it is kept unless discarded explicitly).
  const [asking, setAsking] = useState(false);
  const requestSignOut = () => {
    if ((currentOutbox()?.snapshot().items.length ?? 0) > 0) setAsking(true);
    else signOut.mutate();
  };
  return (
    <View style={styles.bar} testID="app-header">
      <View style={styles.inner}>
        <Link href={links.home()} accessibilityLabel="Your jobs">
          <Wordmark compact />
        </Link>
        <View style={styles.right}>
          <OutboxCountLink />
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
            onPress={requestSignOut}
          />
        </View>
      </View>
      {asking ? (
        <SignOutConfirm
          busy={signOut.isPending}
          onCancel={() => setAsking(false)}
          onSignOut={() => signOut.mutate(undefined, { onSettled: () => setAsking(false) })}
        />
      ) : null}
      <OfflineBanner />
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
