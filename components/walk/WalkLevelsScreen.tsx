import { links } from '../links';
import { Link } from 'expo-router';
import { Pressable, StyleSheet, View } from 'react-native';
import type { LevelDto } from '../../shared/schemas/setup';
import { ApiError } from '../api/client';
import { useJobQuery } from '../queries/jobs';
import { useLevelsQuery } from '../queries/levels';
import { useLevelCoverageQuery } from '../queries/walks';
import { colors, radius, space, touchTarget } from '../theme';
import { AppText } from '../ui/AppText';
import { Button } from '../ui/Button';
import { Screen } from '../ui/Screen';
import { EmptyState, ErrorState, LoadingState } from '../ui/States';
import { InspectorsOnly } from './LevelWalkScreen';


/** Job → level: pick the level to walk; each shows how many of its units are checked. */
export function WalkLevelsScreen({ jobId }: { jobId: string }) {
  const job = useJobQuery(jobId);
  const levels = useLevelsQuery(jobId);
  return (
    <Screen testID="walk-levels-screen" maxWidth={720}>
      <Link href={links.job(jobId)} style={styles.back} testID="walk-levels-back">
        <AppText variant="label" style={{ color: colors.spruce }}>
          ← {job.data?.name ?? 'The job'}
        </AppText>
      </Link>
      <View style={styles.head}>
        <AppText variant="display" role="heading">
          Walk a level
        </AppText>
        <AppText muted>Choose the level you are on. Each unit you check counts toward the level’s coverage, even when all is well.</AppText>
      </View>
      {job.isLoadingError || levels.isLoadingError ? (
        job.error instanceof ApiError && job.error.status === 404 ? (
          <EmptyState title="Job not found" body="This job does not exist, or you are not a member of it." testID="job-not-found" />
        ) : (
          <ErrorState message={(job.error ?? levels.error)?.message ?? ''} onRetry={() => void Promise.all([job.refetch(), levels.refetch()])} />
        )
      ) : job.isPending || levels.isPending ? (
        <LoadingState label="Loading the levels…" />
      ) : job.data.role === 'subcontractor' ? (
        <InspectorsOnly jobId={jobId} />
      ) : levels.data.length === 0 ? (
        <EmptyState title="No levels yet" body="A GC manager adds the job’s levels in set-up." testID="walk-levels-empty" />
      ) : (
        <View style={styles.list} testID="walk-levels">
          {levels.data.map((l) => (
            <LevelRow key={l.id} jobId={jobId} level={l} />
          ))}
        </View>
      )}
      {job.data?.role && job.data.role !== 'subcontractor' ? (
        <Link href={links.scan(jobId)} asChild>
          <Button label="Scan a unit" tone="secondary" testID="walk-levels-scan" />
        </Link>
      ) : null}
      <Link href={links.findings(jobId)} asChild>
        <Button label="All findings on this job" tone="secondary" testID="walk-levels-findings" />
      </Link>
    </Screen>
  );
}

function LevelRow({ jobId, level }: { jobId: string; level: LevelDto }) {
  const coverage = useLevelCoverageQuery(jobId, level.id);
  const c = coverage.data;
  const pct = c && c.total ? Math.round((c.checked / c.total) * 100) : 0;
  return (
    <Link href={links.levelWalk(jobId, level.id)} asChild>
      <Pressable style={styles.row} testID={`walk-level-${level.position}`} accessibilityRole="link">
        <View style={styles.rowMain}>
          <AppText variant="heading">{level.name}</AppText>
          <AppText variant="small" muted testID={`walk-level-${level.position}-coverage`}>
            {c
              ? `${c.checked} of ${c.total} checked${c.withOpenFindings ? ` · ${c.withOpenFindings} with open findings` : ''}`
              : coverage.isError
                ? `${level.unitCount} units`
                : `${level.unitCount} units · counting…`}
          </AppText>
          <View style={styles.bar}>
            <View style={[styles.barFill, { width: `${pct}%` }]} />
          </View>
        </View>
        <AppText variant="title" style={{ color: colors.spruce }} aria-hidden>
          ›
        </AppText>
      </Pressable>
    </Link>
  );
}

const styles = StyleSheet.create({
  back: { alignSelf: 'flex-start', minHeight: touchTarget, minWidth: touchTarget, paddingVertical: space.sm, display: 'flex', alignItems: 'center' },
  head: { gap: space.xs },
  list: { gap: space.sm },
  row: {
    minHeight: touchTarget + 28,
    flexDirection: 'row',
    alignItems: 'center',
    gap: space.md,
    backgroundColor: colors.surface,
    borderRadius: radius.md,
    borderWidth: 1,
    borderColor: colors.line,
    paddingHorizontal: space.md,
    paddingVertical: space.md,
  },
  rowMain: { flex: 1, gap: 6 },
  bar: { height: 8, borderRadius: 4, backgroundColor: colors.spruceSoft, overflow: 'hidden' },
  barFill: { height: 8, backgroundColor: colors.spruce },
});
