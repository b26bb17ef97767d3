import { Link } from 'expo-router';
import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import type { UnitSystem } from '../../shared/catalogue/types';
import { dueAgainWords } from '../../shared/rules/dueAgain';
import type { FindingDetail, ReinspectionQueueItem, ReinspectionVerdict } from '../../shared/schemas/findings';
import { ApiError } from '../api/client';
import { formatDay, formatWhen } from '../findings/due';
import { findingPlace } from '../findings/FindingCard';
import { useReinspectionQueueQuery } from '../queries/correction';
import { useJobQuery } from '../queries/jobs';
import { colors, linkTarget, radius, space } from '../theme';
import { AppText } from '../ui/AppText';
import { Notice } from '../ui/Notice';
import { Screen } from '../ui/Screen';
import { EmptyState, ErrorState, LoadingState } from '../ui/States';
import { SeverityMark } from '../walk/SeverityMark';
import { BeforeAfter } from './BeforeAfter';
import { ReinspectControls } from './ReinspectControls';
import { links } from '../links';
import { daysWaiting, waitingWords } from '../../shared/rules/waiting';

/**
 * The inspector's re-inspection queue: fixes waiting, grouped by level so one walk clears them;
 * before and after photos side by side; accept, or return with a reason, in one tap.
 */
/** "Due again on …" from the finding a return answered with (its latest event is the return). */
function returnedDueWords(finding: FindingDetail | null): string | null {
  const returned = finding ? [...finding.events].reverse().find((e) => e.kind === 'returned') : undefined;
  return finding && returned ? dueAgainWords(returned.to, finding.severity, formatDay) : null;
}

export function ReinspectionQueueScreen({ jobId }: { jobId: string }) {
  const job = useJobQuery(jobId);
  const queue = useReinspectionQueueQuery(jobId);
  const [last, setLast] = useState<{ label: string; verdict: ReinspectionVerdict; dueAgain: string | null } | null>(null);
  const failed = queue.isError ? queue.error : job.isError ? job.error : null;
  return (
    <Screen testID="reinspections-screen" maxWidth={900}>
      <Link href={links.job(jobId)} style={styles.back} testID="reinspections-back">
        <AppText variant="label" style={{ color: colors.spruce }}>
          ← {job.data?.name ?? 'The job'}
        </AppText>
      </Link>
      <View style={styles.head}>
        <AppText variant="display" role="heading">
          Re-inspections
        </AppText>
        {queue.data ? (
          <AppText muted testID="reinspections-total">
            {queue.data.total} fix{queue.data.total === 1 ? '' : 'es'} waiting
            {queue.data.levels.length > 1 ? ` on ${queue.data.levels.length} levels` : ''}
          </AppText>
        ) : null}
      </View>
      {last ? (
        <Notice tone={last.verdict === 'accept' ? 'success' : 'info'} testID="reinspections-done">
          {last.verdict === 'accept'
            ? `${last.label} accepted and closed.`
            : `${last.label} returned to the subcontractor with your reason.${last.dueAgain ? ` ${last.dueAgain}.` : ''}`}
        </Notice>
      ) : null}
      {failed ? (
        failed instanceof ApiError && (failed.status === 404 || failed.status === 403) ? (
          <EmptyState
            title={failed.status === 403 ? 'Re-inspections are for inspectors' : 'Job not found'}
            body={failed.status === 403 ? 'Inspectors and GC managers re-inspect fixes.' : 'This job does not exist, or you are not a member of it.'}
            testID="reinspections-refused"
          />
        ) : (
          <ErrorState message={failed.message} onRetry={() => void Promise.all([queue.refetch(), job.refetch()])} testID="reinspections-error" />
        )
      ) : !queue.data || !job.data ? (
        <LoadingState label="Loading the fixes waiting…" testID="reinspections-loading" />
      ) : queue.data.total === 0 ? (
        <EmptyState title="No fix is waiting" body="Fixes that subcontractors submit show here, grouped by level." testID="reinspections-empty" />
      ) : (
        <View style={styles.levels} testID="reinspections-levels">
          {queue.data.levels.map((level) => (
            <View key={level.levelId} style={styles.level} testID={`reinspections-level-${level.levelId}`}>
              <AppText variant="title" role="heading">
                {level.levelName} · {level.items.length}
              </AppText>
              {level.items.map((item) => (
                <QueueCard
                  key={item.finding.id}
                  jobId={jobId}
                  item={item}
                  timeZone={job.data.timeZone}
                  system={job.data.unitSystem}
                  onStale={() => void queue.refetch()}
                  onDone={(verdict, after) => setLast({ label: item.finding.label, verdict, dueAgain: returnedDueWords(after) })}
                />
              ))}
            </View>
          ))}
        </View>
      )}
    </Screen>
  );
}

function QueueCard({
  jobId,
  item,
  timeZone,
  system,
  onStale,
  onDone,
}: {
  jobId: string;
  item: ReinspectionQueueItem;
  timeZone: string;
  system: UnitSystem;
  onStale: () => void;
  onDone: (verdict: ReinspectionVerdict, finding: FindingDetail | null) => void;
}) {
  const f = item.finding;
  const fix = item.latestFix;
  return (
    <View style={styles.card} testID={`reinspection-${f.number}`}>
      <Link href={links.finding(jobId, f.id)}>
        <AppText variant="label" style={styles.link}>
          {f.label} · {f.code} →
        </AppText>
      </Link>
      <AppText variant="heading">{f.title}</AppText>
      <AppText variant="small" muted>
        {findingPlace(f)} · {f.companyName}
      </AppText>
      <View style={styles.meta}>
        <SeverityMark severity={f.severity} />
        <AppText variant="small" style={f.overdue ? styles.overdue : null}>
          {f.overdue ? '⚠ Overdue since ' : 'Due '}
          {formatDay(f.dueOn)}
        </AppText>
        {f.returnCount ? (
          <AppText variant="small" muted>
            returned {f.returnCount}×
          </AppText>
        ) : null}
      </View>
      {fix ? (
        <View style={styles.fix} testID={`reinspection-${f.number}-fix`}>
          <AppText variant="small" muted>
            Fix by {fix.submittedBy.name}, {formatWhen(fix.submittedAt, timeZone)}
          </AppText>
          {/* Waiting on the inspector, not the company: never overdue, but how long it has waited shows. */}
          <AppText variant="label" testID={`reinspection-${f.number}-waiting`}>
            {waitingWords(daysWaiting(fix.submittedAt, timeZone))}
          </AppText>
          <AppText>“{fix.note}”</AppText>
        </View>
      ) : null}
      <BeforeAfter before={item.originalPhotos} after={fix?.photos ?? []} label={f.label} testID={`reinspection-${f.number}-photos`} />
      <ReinspectControls
        jobId={jobId}
        finding={f}
        measured={item.rule ? { rule: item.rule, original: f.ruleResult, system } : null}
        onStale={onStale}
        onDone={onDone}
        testID={`reinspection-${f.number}-verdict`}
      />
    </View>
  );
}

const styles = StyleSheet.create({
  back: linkTarget,
  head: { gap: space.xs },
  levels: { gap: space.xl },
  level: { gap: space.md },
  card: {
    backgroundColor: colors.surface,
    borderRadius: radius.lg,
    borderWidth: 1,
    borderColor: colors.line,
    borderLeftWidth: 6,
    borderLeftColor: colors.ochre,
    padding: space.lg,
    gap: space.sm,
  },
  link: { color: colors.spruce },
  meta: { flexDirection: 'row', alignItems: 'center', gap: space.sm, flexWrap: 'wrap' },
  overdue: { color: colors.danger, fontWeight: '700' },
  fix: { backgroundColor: colors.paper, borderRadius: radius.md, padding: space.sm, gap: 2 },
});
