import { Link } from 'expo-router';
import { useState } from 'react';
import { Pressable, StyleSheet, View } from 'react-native';
import type { WalkDetail, WalkDto } from '../../shared/schemas/findings';
import { ApiError } from '../api/client';
import type { JobDetail } from '../../shared/schemas/setup';
import { SEVERITIES, SEVERITY_LABELS } from '../../shared/words';
import { links } from '../links';
import { useFinishWalkMutation, useWalkQuery } from '../queries/walks';
import { choiceChip, colors, space } from '../theme';
import { AppText } from '../ui/AppText';
import { Button } from '../ui/Button';
import { Card } from '../ui/Card';
import { Notice } from '../ui/Notice';
import { ErrorState, LoadingState } from '../ui/States';

const plural = (n: number, one: string, many = `${one}s`) => `${n} ${n === 1 ? one : many}`;

/** "2 critical, 1 minor" (the severities with findings), or null when nothing was logged. */
export function findingsBySeverityText(counts: WalkDetail['summary']['findingsBySeverity']): string | null {
  const parts = SEVERITIES.filter((s) => counts[s] > 0).map((s) => `${counts[s]} ${SEVERITY_LABELS[s].toLowerCase()}`);
  return parts.length ? parts.join(', ') : null;
}

/**
 * "Finish walk": first the walk's summary (units checked of the level, findings logged on this
 * walk by severity, the units left unchecked with a link each), then the question; the walk ends
 * only on "End the walk".
 */
export function FinishWalk({ job, walk }: { job: JobDetail; walk: WalkDto }) {
  const [asking, setAsking] = useState(false);
  if (!asking) {
    return <Button label="Finish walk" tone="secondary" testID="walk-finish" onPress={() => setAsking(true)} style={styles.open} />;
  }
  return <WalkSummaryCard job={job} walk={walk} onKeepWalking={() => setAsking(false)} />;
}

function WalkSummaryCard({ job, walk, onKeepWalking }: { job: JobDetail; walk: WalkDto; onKeepWalking: () => void }) {
  const detail = useWalkQuery(job.id, walk.id);
  const finish = useFinishWalkMutation(job.id);
  const d = detail.data;
  const found = d ? findingsBySeverityText(d.summary.findingsBySeverity) : null;
  // No signal: the query waits paused (or failed on the network), and a summary read earlier is not shown as now.
  const offline = !d && (detail.fetchStatus === 'paused' || (detail.error instanceof ApiError && detail.error.status === 0));
  return (
    <Card testID="walk-summary">
      <AppText variant="heading" role="heading">
        {`Finish your walk on ${walk.levelName}?`}
      </AppText>
      {offline ? (
        <Notice tone="info" testID="walk-summary-offline">
          No signal: the walk's summary cannot be read now. Ending the walk is kept on this phone and sent with the rest of your work.
        </Notice>
      ) : detail.isPending ? (
        <LoadingState label="Reading the walk…" testID="walk-summary-loading" />
      ) : detail.isError || !d ? (
        <ErrorState message={detail.error?.message ?? 'That did not load.'} onRetry={() => void detail.refetch()} testID="walk-summary-error" />
      ) : (
        <View style={styles.body}>
          <AppText testID="walk-summary-checked">
            {`Units checked: ${d.coverage.checked} of ${d.coverage.total} on ${walk.levelName}`}
            {` (${plural(d.checkedInWalk, 'unit')} on this walk).`}
          </AppText>
          <AppText testID="walk-summary-findings">{found ? `Findings logged on this walk: ${found}.` : 'No findings logged on this walk.'}</AppText>
          {d.summary.unchecked.length === 0 ? (
            <AppText testID="walk-summary-unchecked-none">{`Every unit on ${walk.levelName} is checked.`}</AppText>
          ) : (
            <View style={styles.left} testID="walk-summary-unchecked">
              <AppText variant="label">{`Left unchecked: ${plural(d.summary.unchecked.length, 'unit')}`}</AppText>
              <View style={styles.units}>
                {d.summary.unchecked.map((u) => (
                  <Link key={u.id} href={links.unitCheck(job.id, u.id)} asChild>
                    <Pressable
                      accessibilityRole="link"
                      aria-label={`Check unit ${u.tag}${u.inProgress ? ' (check not finished)' : ''}`}
                      testID={`walk-summary-unit-${u.tag}`}
                      style={u.inProgress ? unitStarted : styles.unit}
                    >
                      <AppText variant="label" style={{ color: colors.spruce }}>
                        {u.inProgress ? `${u.tag} · not finished` : u.tag}
                      </AppText>
                    </Pressable>
                  </Link>
                ))}
              </View>
            </View>
          )}
        </View>
      )}
      {finish.isError ? (
        <Notice tone="error" testID="walk-summary-finish-error">
          {`The walk did not end: ${finish.error.message}`}
        </Notice>
      ) : null}
      <View style={styles.actions}>
        <Button label="End the walk" testID="walk-summary-end" busy={finish.isPending} onPress={() => finish.mutate({ id: walk.id, levelId: walk.levelId, levelName: walk.levelName, inspectorId: walk.inspector.id })} style={styles.action} />
        <Button label="Keep walking" tone="secondary" testID="walk-summary-keep" disabled={finish.isPending} onPress={onKeepWalking} style={styles.action} />
      </View>
    </Card>
  );
}

const styles = StyleSheet.create({
  open: { alignSelf: 'flex-end' },
  body: { gap: space.sm },
  left: { gap: space.xs },
  units: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm },
  unit: choiceChip,
  unitStarted: { borderColor: colors.ochre },
  actions: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm },
  action: { flexGrow: 1 },
});
// One style object: a Link's child (asChild) is handed its style as it is, and the web refuses an array there.
const unitStarted = StyleSheet.flatten([styles.unit, styles.unitStarted]);
