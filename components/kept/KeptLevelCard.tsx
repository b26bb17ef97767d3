import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { useSessionQuery } from '../queries/session';
import { colors, radius, space } from '../theme';
import { AppText } from '../ui/AppText';
import { Button } from '../ui/Button';
import { Notice } from '../ui/Notice';
import { keptSentence } from './format';
import { KeepError } from './keepLevel';
import { useKeptActions } from './KeptQueryProvider';
import { useKeepProgress, useKeptLevel } from './registry';

/**
 * On a level's walk: keep the level on this phone for a walk without signal, see what is kept
 * ("Level 3 kept on this phone, 14 MB, updated 08:12"), bring it up to date, or stop keeping it.
 */
export function KeptLevelCard({ jobId, levelId, levelName, timeZone }: { jobId: string; levelId: string; levelName: string; timeZone: string }) {
  const actions = useKeptActions();
  const session = useSessionQuery();
  const kept = useKeptLevel(jobId, levelId);
  const progress = useKeepProgress(jobId, levelId);
  const [error, setError] = useState<string | null>(null);
  const [stopping, setStopping] = useState(false);
  const userId = session.data?.user?.id;
  if (!actions || !userId) return null;

  const keep = () => {
    setError(null);
    actions.keep({ jobId, levelId, userId }).catch((err: unknown) => {
      setError(
        err instanceof KeepError
          ? err.message
          : `${levelName} could not be kept on this phone: ${err instanceof Error ? err.message : 'try again with signal.'}`,
      );
    });
  };
  const stop = () => {
    setStopping(true);
    void actions.stop(jobId, levelId).finally(() => setStopping(false));
  };
  const busy = Boolean(progress);
  const progressText = progress && progress.total > 0 ? `Keeping ${levelName} on this phone… ${progress.done} of ${progress.total}` : `Keeping ${levelName} on this phone…`;

  return (
    <View style={[styles.box, kept ? styles.kept : null]} testID="kept-level">
      {kept ? (
        <AppText style={styles.text} testID="kept-level-status">
          {keptSentence(kept.levelName, kept.bytes, kept.updatedAt, timeZone)}
        </AppText>
      ) : (
        <AppText variant="small" muted testID="kept-level-none">
          For a walk without signal: keep this level’s units, checklists and open findings with their photos on this phone.
        </AppText>
      )}
      {busy ? (
        <AppText variant="small" muted testID="kept-level-progress" role="status">
          {progressText}
        </AppText>
      ) : null}
      {error ? (
        <Notice tone="error" testID="kept-level-error">
          {error}
        </Notice>
      ) : null}
      <View style={styles.row}>
        {kept ? (
          <>
            <Button label="Update now" tone="secondary" testID="kept-level-update" busy={busy} onPress={keep} style={styles.grow} />
            <Button label="Stop keeping" tone="quiet" testID="kept-level-stop" busy={stopping} disabled={busy} onPress={stop} />
          </>
        ) : (
          <Button label="Keep this level on the phone" tone="secondary" testID="kept-level-keep" busy={busy} onPress={keep} style={styles.grow} />
        )}
      </View>
    </View>
  );
}

const styles = StyleSheet.create({
  box: {
    gap: space.sm,
    backgroundColor: colors.surface,
    borderRadius: radius.md,
    borderWidth: 1,
    borderColor: colors.line,
    padding: space.md,
  },
  kept: { borderLeftWidth: 4, borderLeftColor: colors.spruce, backgroundColor: colors.spruceSoft },
  text: {},
  row: { flexDirection: 'row', gap: space.sm, alignItems: 'center', flexWrap: 'wrap' },
  grow: { flexGrow: 1 },
});
