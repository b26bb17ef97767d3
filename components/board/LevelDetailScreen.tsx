import { Link } from 'expo-router';
import { StyleSheet, View } from 'react-native';
import { ApiError } from '../api/client';
import { useBoardQuery, useReadinessQuery, useTrendQuery } from '../queries/board';
import { useJobQuery } from '../queries/jobs';
import { colors, space } from '../theme';
import { AppText } from '../ui/AppText';
import { Button } from '../ui/Button';
import { ExportLink } from '../exports/ExportLink';
import { unitLabelsUrl } from '../scan/labelsLink';
import { Card } from '../ui/Card';
import { Screen } from '../ui/Screen';
import { EmptyState, ErrorState, LoadingState } from '../ui/States';
import { useWide } from '../ui/useWide';
import { links } from '../links';
import { BackLink, CoverageBar, StatusTiles } from './parts';
import { LevelReadinessCard, UnitsNotReady } from './Readiness';
import { TrendChart } from './TrendChart';
import { CrewListLinks } from '../reports/CrewListLinks';
import { ReportActions } from '../reports/ReportActions';

/** One level: its numbers from the board, whether its ceilings can close (and what blocks them), its trend, and the way to walk it or see its plan. */
export function LevelDetailScreen({ jobId, levelId }: { jobId: string; levelId: string }) {
  const wide = useWide();
  const job = useJobQuery(jobId);
  const board = useBoardQuery(jobId);
  const readiness = useReadinessQuery(jobId, { levelId });
  const trend = useTrendQuery(jobId, { levelId });
  const row = board.data?.levels.find((l) => l.levelId === levelId);
  const levelReadiness = readiness.data?.levels.find((l) => l.levelId === levelId);
  // The level's units (a system is listed with all its units, some of them maybe on other levels).
  const units = readiness.data
    ? [...readiness.data.systems.flatMap((s) => s.units), ...readiness.data.unitsWithoutSystem].filter((u) => u.levelId === levelId)
    : [];
  const role = job.data?.role;

  return (
    <Screen testID="level-screen" maxWidth={wide ? 1100 : 720}>
      <BackLink href={links.board(jobId)} label="Levels board" testID="level-back" />
      {board.isPending ? (
        <LoadingState label="Loading the level…" />
      ) : board.isError ? (
        board.error instanceof ApiError && board.error.status === 404 ? (
          <EmptyState title="Job not found" body="This job does not exist, or you are not a member of it." testID="job-not-found" />
        ) : (
          <ErrorState message={board.error.message} onRetry={() => board.refetch()} />
        )
      ) : !row ? (
        <EmptyState title="Level not found" body="This level is not on the job (it may have been removed)." testID="level-not-found" />
      ) : (
        <>
          <View style={styles.head}>
            <AppText variant="small" muted>
              {job.data?.name ?? 'Level'}
            </AppText>
            <AppText variant="display" role="heading" testID="level-name">
              {row.name}
            </AppText>
          </View>
          <View style={styles.actions}>
            {role && role !== 'subcontractor' ? (
              <Link href={links.levelWalk(jobId, levelId)} asChild>
                <Button label="Walk this level" testID="level-walk" style={styles.grow} />
              </Link>
            ) : null}
            {role && role !== 'subcontractor' ? (
              <ExportLink href={unitLabelsUrl(jobId, { levelId })} label="Print unit labels" testID="level-labels" />
            ) : null}
            <Link href={links.plan(jobId, levelId)} asChild>
              <Button label="Plan" tone="secondary" testID="level-plan" style={styles.grow} />
            </Link>
            <Link href={links.findings(jobId, { levelId })} asChild>
              <Button label="Findings on this level" tone="secondary" testID="level-findings" style={styles.grow} />
            </Link>
            <Link href={links.tests(jobId)} asChild>
              <Button label="Test records" tone="secondary" testID="level-tests" style={styles.grow} />
            </Link>
          </View>
          <ReportActions
            jobId={jobId}
            place={{ levelId }}
            what="of this level"
            crewList={role === 'subcontractor' ? { levelId } : null}
            testID="level-reports"
          />
          {role && role !== 'subcontractor' ? <CrewListLinks jobId={jobId} levelId={levelId} testID="level-crew-lists" /> : null}
          <Card testID="level-counts">
            <StatusTiles jobId={jobId} levelId={levelId} row={row} place={row.name} cellTestID={(k) => `level-cell-${k}`} ofOpenTestID="level-of-open" />
            <AppText variant="label">Units checked</AppText>
            <CoverageBar checked={row.unitsChecked} total={row.unitsTotal} testID="level-coverage" />
          </Card>
          {readiness.isPending ? (
            <LoadingState label="Loading readiness…" testID="level-readiness-loading" />
          ) : readiness.isError ? (
            <ErrorState message={readiness.error.message} onRetry={() => readiness.refetch()} testID="level-readiness-error" />
          ) : levelReadiness ? (
            <>
              <LevelReadinessCard jobId={jobId} level={levelReadiness} linkName={false} title="Closing the ceilings" />
              <Card testID="level-startup">
                <AppText variant="title">Units ready for startup</AppText>
                <AppText variant="small" muted>
                  {units.filter((u) => u.ready).length} of {units.length} units on {row.name} are ready: a complete unit check and no unresolved
                  critical or major finding.
                </AppText>
                <UnitsNotReady jobId={jobId} units={units} testID="level-startup-blocks" />
              </Card>
            </>
          ) : null}
          <Card testID="level-trend">
            {trend.isPending ? (
              <LoadingState label="Loading the trend…" testID="trend-loading" />
            ) : trend.isError ? (
              <ErrorState message={trend.error.message} onRetry={() => trend.refetch()} testID="trend-error" />
            ) : (
              <TrendChart points={trend.data.points} title={`Open findings on ${row.name} over time`} />
            )}
          </Card>
          <Link href={links.readiness(jobId)} testID="level-readiness-link">
            <AppText variant="label" style={styles.more}>
              Systems ready for startup →
            </AppText>
          </Link>
        </>
      )}
    </Screen>
  );
}

const styles = StyleSheet.create({
  head: { gap: space.xs },
  actions: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm },
  grow: { flexGrow: 1, flexBasis: 160 },
  more: { color: colors.spruce },
});
