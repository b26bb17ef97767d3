import { Link } from 'expo-router';
import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { currentOutbox } from '../outbox';
import { OfflineBanner, OutboxCountLink, SignOutConfirm } from '../outbox/HeaderParts';
import { useSessionQuery, useSignOutMutation } from '../queries/session';
import { colors, contentMaxWidth, linkTarget, space, touchTarget } from '../theme';
import { AppText } from './AppText';
import { Button } from './Button';
import { useWide } from './useWide';
import { Wordmark } from './Wordmark';
import { links } from '../links';

export function AppHeader() {
  const session = useSessionQuery();
  const signOut = useSignOutMutation();
  const user = session.data?.user;
  // A phone has no room beside the name: it goes to its own line, whole (a company name is never cut).
  const wide = useWide();
  const who = user ? (
    <View style={wide ? styles.who : styles.whoNarrow} testID="header-who">
      <AppText variant="label" testID="header-user-name">
        {user.name}
      </AppText>
      <AppText variant="small" muted testID="header-company-name">
        {user.company.name}
      </AppText>
    </View>
  ) : null;
  const preferences = user ? (
    <Link href={links.preferences()} testID="header-preferences" style={styles.prefs}>
      <AppText variant="label" style={styles.prefsText}>
        Mail preferences
      </AppText>
    </Link>
  ) : null;
  // Work not sent yet: signing out asks first (it is kept unless discarded explicitly).
  const [asking, setAsking] = useState(false);
  const requestSignOut = () => {
    if ((currentOutbox()?.snapshot().items.length ?? 0) > 0) setAsking(true);
    else signOut.mutate();
  };
  return (
    <View style={styles.bar} testID="app-header" role="banner">
      <View style={styles.inner}>
        <Link href={links.home()} accessibilityLabel="Trimout: your jobs" style={styles.home} testID="header-home">
          <Wordmark compact />
        </Link>
        <View style={styles.right}>
          <OutboxCountLink />
          {wide ? who : null}
          {wide ? preferences : null}
          <Button
            testID="sign-out"
            label="Sign out"
            tone="quiet"
            busy={signOut.isPending}
            onPress={requestSignOut}
          />
        </View>
      </View>
      {!wide && user ? (
        <View style={[styles.inner, styles.second]}>
          {who}
          {preferences}
        </View>
      ) : null}
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
    // At 200% text on a phone the wordmark and Sign out no longer fit one line: they wrap.
    flexWrap: 'wrap',
    alignItems: 'center',
    justifyContent: 'space-between',
    gap: space.md,
  },
  right: { flexDirection: 'row', alignItems: 'center', gap: space.sm, flexShrink: 1 },
  home: { minHeight: touchTarget, display: 'flex', alignItems: 'center' },
  who: { alignItems: 'flex-end', flexShrink: 1 },
  whoNarrow: { flexShrink: 1, minWidth: 0 },
  second: { paddingTop: 0, alignItems: 'center' },
  prefs: { ...linkTarget, alignSelf: 'center', paddingHorizontal: space.sm },
  prefsText: { color: colors.spruce, textDecorationLine: 'underline' },
});
