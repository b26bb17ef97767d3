/**
 * The outbox in the app header: the count ("6 waiting to send", linking to the sync screen), the
 * no-signal banner, and the warning before signing out with work not sent.
 */
import { Link } from 'expo-router';
import { useState, useSyncExternalStore } from 'react';
import { StyleSheet, View } from 'react-native';
import { serverUnreachable, subscribeReach } from '../api/reach';
import { links } from '../links';
import { colors, radius, space, touchTarget } from '../theme';
import { AppText } from '../ui/AppText';
import { Button } from '../ui/Button';
import { currentOutbox, notSentWords, useOutboxSnapshot, waitingWords } from './index';

type OnlineTarget = { addEventListener?: (t: string, f: () => void) => void; removeEventListener?: (t: string, f: () => void) => void };

function subscribeOnline(fn: () => void) {
  const w = globalThis as OnlineTarget;
  w.addEventListener?.('online', fn);
  w.addEventListener?.('offline', fn);
  const stopReach = subscribeReach(fn);
  return () => {
    w.removeEventListener?.('online', fn);
    w.removeEventListener?.('offline', fn);
    stopReach();
  };
}

/**
 * Online: the browser says so (true where it cannot say: native builds, tests) and the last
 * request to Trimout got an answer (components/api/reach.ts: the browser's word alone is wrong on
 * a Wi-Fi with no way out).
 */
export function useOnline(): boolean {
  return useSyncExternalStore(
    subscribeOnline,
    () => (globalThis as { navigator?: { onLine?: boolean } }).navigator?.onLine !== false && !serverUnreachable(),
    () => true,
  );
}

/** "6 waiting to send" (or "1 needs attention"), a link to the sync screen; nothing when the queue is empty. */
export function OutboxCountLink() {
  const snap = useOutboxSnapshot();
  const n = snap.items.length;
  if (n === 0) return null;
  const attention = snap.items.filter((i) => i.state === 'attention').length;
  const needs = `${attention} need${attention === 1 ? 's' : ''} attention`;
  const words = attention ? (n > attention ? `${needs} · ${waitingWords(n - attention)}` : needs) : waitingWords(n);
  return (
    <Link href={links.sync()} accessibilityLabel={`${words}: open the list`} testID="header-outbox" style={[styles.count, attention ? styles.countAttention : null]}>
      <AppText variant="label" style={attention ? styles.countAttentionText : styles.countText}>
        {words}
      </AppText>
    </Link>
  );
}

/** Under the header with no signal: the work goes on, kept on this phone. */
export function OfflineBanner() {
  const online = useOnline();
  const snap = useOutboxSnapshot();
  if (online) return null;
  const n = snap.items.length;
  return (
    <View style={styles.banner} role="status" testID="offline-banner">
      <AppText variant="label" style={styles.bannerText}>
        No signal. Work you save is kept on this phone and sent when the signal is back{n ? ` · ${waitingWords(n)}` : ''}.
      </AppText>
    </View>
  );
}

/**
 * Asked before signing out while work waits: signing out keeps it on the phone (it is sent after this
 * person signs in again); discarding it is a separate, confirmed choice.
 */
export function SignOutConfirm({ onSignOut, onCancel, busy }: { onSignOut: () => void; onCancel: () => void; busy?: boolean }) {
  const snap = useOutboxSnapshot();
  const [discarding, setDiscarding] = useState(false);
  const n = snap.items.length;
  return (
    <View style={styles.confirm} role="alert" testID="sign-out-warning">
      <AppText variant="heading">{notSentWords(n)}.</AppText>
      {discarding ? (
        <>
          <AppText>Discard {n === 1 ? 'it' : `all ${n}`} for good? {n === 1 ? 'It' : 'They'} will never reach Trimout.</AppText>
          <View style={styles.actions}>
            <Button
              label={n === 1 ? 'Discard it and sign out' : `Discard ${n} items and sign out`}
              tone="danger"
              testID="sign-out-discard-confirm"
              busy={busy}
              onPress={async () => {
                await currentOutbox()?.discardAll();
                onSignOut();
              }}
            />
            <Button label="Keep them" tone="secondary" testID="sign-out-discard-cancel" onPress={() => setDiscarding(false)} />
          </View>
        </>
      ) : (
        <>
          <AppText>
            {n === 1 ? 'It stays' : 'They stay'} on this phone and {n === 1 ? 'is' : 'are'} sent when you sign in again. Nobody else who signs in here sees {n === 1 ? 'it' : 'them'}.
          </AppText>
          <View style={styles.actions}>
            <Button label="Stay signed in" testID="sign-out-cancel" onPress={onCancel} />
            <Button label="Sign out, keep them" tone="secondary" testID="sign-out-keep" busy={busy} onPress={onSignOut} />
            <Button label="Discard them…" tone="quiet" testID="sign-out-discard" onPress={() => setDiscarding(true)} />
          </View>
        </>
      )}
    </View>
  );
}

const styles = StyleSheet.create({
  count: {
    minHeight: touchTarget,
    paddingHorizontal: space.sm,
    borderRadius: radius.md,
    backgroundColor: colors.ochreSoft,
    display: 'flex',
    alignItems: 'center',
    justifyContent: 'center',
  },
  countText: { color: '#5A3B00' },
  countAttention: { backgroundColor: colors.dangerSoft },
  countAttentionText: { color: colors.danger },
  banner: { alignSelf: 'stretch', backgroundColor: colors.ochreSoft, borderBottomWidth: 1, borderBottomColor: colors.ochre, paddingHorizontal: space.lg, paddingVertical: space.sm, alignItems: 'center' },
  bannerText: { color: '#5A3B00' },
  confirm: { alignSelf: 'stretch', backgroundColor: colors.surface, borderBottomWidth: 1, borderBottomColor: colors.line, padding: space.lg, gap: space.sm },
  actions: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm },
});
