import { useEffect, useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { readEntry, removeEntry, storeKey, writeEntry } from '../drafts/store';
import { space } from '../theme';
import { AppText } from '../ui/AppText';
import { Button } from '../ui/Button';
import { defaultOutboxStorage } from './storage';
import { waitingWords } from './index';

/**
 * Who was last signed in on this device, so that an app opened with no signal can say that their
 * saved work waits (a count only) and send it as soon as the server answers. Forgotten on sign-out:
 * the next person on the phone is never told about another's queue.
 */
const LAST_KEY = storeKey('outbox', 'device', 'all', 'last-signed-in');
const isId = (x: unknown): x is string => typeof x === 'string' && x.length > 0;

export function rememberSignedIn(userId: string): void {
  if (readEntry(LAST_KEY, isId)?.data !== userId) writeEntry(LAST_KEY, userId);
}

export function forgetSignedIn(): void {
  removeEntry(LAST_KEY);
}

/** How often the screen asks the server again while the browser believes it is online. */
const RETRY_MS = 20_000;

/**
 * The app opened with no signal and no session kept on the phone: it says so, says how much of
 * the last person's work waits on the phone, and opens by itself when the signal is back (the
 * browser's `online` event, and a retry every 20 s), so the outbox starts and sends.
 */
export function OfflineStart({ message, onRetry }: { message: string; onRetry: () => void }) {
  const [waiting, setWaiting] = useState(0);
  useEffect(() => {
    const last = readEntry(LAST_KEY, isId)?.data;
    if (!last) return;
    let live = true;
    defaultOutboxStorage()
      .list(last)
      .then((items) => live && setWaiting(items.length))
      .catch(() => undefined);
    return () => {
      live = false;
    };
  }, []);
  useEffect(() => {
    const w = globalThis as { addEventListener?: (t: string, f: () => void) => void; removeEventListener?: (t: string, f: () => void) => void };
    w.addEventListener?.('online', onRetry);
    const timer = setInterval(onRetry, RETRY_MS);
    return () => {
      w.removeEventListener?.('online', onRetry);
      clearInterval(timer);
    };
  }, [onRetry]);
  return (
    <View style={styles.box} testID="offline-start" role="alert">
      <AppText variant="heading">No signal</AppText>
      <AppText muted style={styles.center}>
        {message}
      </AppText>
      {waiting > 0 ? (
        <AppText style={styles.center} testID="offline-start-waiting">
          {waitingWords(waiting)} on this phone. Trimout opens and sends them as soon as the signal is back.
        </AppText>
      ) : (
        <AppText muted style={styles.center}>
          Trimout opens by itself as soon as the signal is back.
        </AppText>
      )}
      <Button label="Try again" tone="secondary" onPress={onRetry} testID="offline-start-retry" />
    </View>
  );
}

const styles = StyleSheet.create({
  box: { alignItems: 'center', gap: space.md, padding: space.xl },
  center: { textAlign: 'center' },
});
