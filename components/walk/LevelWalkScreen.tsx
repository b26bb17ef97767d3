import { unitKindLabel } from '../../shared/words';
import { links } from '../links';
import { walkProgress } from './walkProgress';
import { Link } from 'expo-router';
import { LevelWaiting, UnitWaiting, useSavedCheckWords } from '../outbox/Waiting';
import { LevelPlanLink } from '../plans/PlanPinLink';
import { Pressable, StyleSheet, View } from 'react-native';
import type { Coverage, WalkUnitDto } from '../../shared/schemas/findings';
import type { JobDetail } from '../../shared/schemas/setup';
import { ApiError } from '../api/client';
import { formatWhen } from '../findings/due';
import { KeptLevelCard } from '../kept/KeptLevelCard';
import { useJobQuery } from '../queries/jobs';
import { useLevelsQuery } from '../queries/levels';
import { useSessionQuery } from '../queries/session';
import { useSpacesQuery } from '../queries/spaces';
import { useSystemsQuery } from '../queries/systems';
import { useOpenWalkQuery, useWalkUnitsQuery, type WalkUnitFilters } from '../queries/walks';
import { colors, radius, space, touchTarget } from '../theme';
import { AppText } from '../ui/AppText';
import { Button } from '../ui/Button';
import { Card } from '../ui/Card';
import { Notice } from '../ui/Notice';
import { Screen } from '../ui/Screen';
import { EmptyState, ErrorState, LoadingState } from '../ui/States';
import { FinishWalk } from './FinishWalk';
import { UnitStateBadge } from './UnitStateBadge';
import { WalkFilters } from './WalkFilters';
import { AuditUnitMark } from '../audits/AuditUnitMark';



/** One level's walk: coverage, the inspector's walk, and the units with their state at a glance. */
export function LevelWalkScreen({
  jobId,
  levelId,
  saved,
  filters,
  onFiltersChange,
}: {
  jobId: string;
  levelId: string;
  saved?: string;
  /** The unit filters, from the route (they live in the address: links.levelWalk). */
  filters: WalkUnitFilters;
  onFiltersChange: (next: WalkUnitFilters) => void;
}) {
  const job = useJobQuery(jobId);
  const levels = useLevelsQuery(jobId);
  const level = levels.data?.find((l) => l.id === levelId);
  return (
    <Screen testID="level-walk-screen" maxWidth={720}>
      <Link href={links.walk(jobId)} style={styles.back} testID="level-walk-back">
        <AppText variant="label" style={{ color: colors.spruce }}>
          ← All levels
        </AppText>
      </Link>
      {/* Only a first load that failed: a refetch failing with no signal keeps what was shown. */}
      {job.isLoadingError || levels.isLoadingError ? (
        job.error instanceof ApiError && job.error.status === 404 ? (
          <EmptyState title="Job not found" body="This job does not exist, or you are not a member of it." testID="job-not-found" />
        ) : (
          <ErrorState message={(job.error ?? levels.error)?.message ?? ''} onRetry={() => void Promise.all([job.refetch(), levels.refetch()])} />
        )
      ) : job.isPending || levels.isPending ? (
        <LoadingState label="Loading the level…" />
      ) : !level ? (
        <EmptyState title="Level not found" body="This level is not on the job any more." testID="level-not-found" />
      ) : job.data.role === 'subcontractor' ? (
        <InspectorsOnly jobId={jobId} />
      ) : (
        <LevelWalkBody job={job.data} levelId={level.id} levelName={level.name} saved={saved} filters={filters} onFiltersChange={onFiltersChange} />
      )}
    </Screen>
  );
}

/** Walks show every company's work: subcontractors see their own findings in the list instead. */
export function InspectorsOnly({ jobId }: { jobId: string }) {
  return (
    <EmptyState
      title="Walks are for inspectors"
      body="Inspectors and GC managers walk the levels. Your company's findings are in the findings list."
      testID="walk-inspectors-only"
      action={
        <Link href={links.findings(jobId)} asChild>
          <Button label="Your findings" tone="secondary" />
        </Link>
      }
    />
  );
}

function LevelWalkBody({
  job,
  levelId,
  levelName,
  saved,
  filters,
  onFiltersChange,
}: {
  job: JobDetail;
  levelId: string;
  levelName: string;
  saved?: string;
  filters: WalkUnitFilters;
  onFiltersChange: (next: WalkUnitFilters) => void;
}) {
  const units = useWalkUnitsQuery(job.id, levelId, filters);
  const savedWords = useSavedCheckWords(job.id, saved);
  const spaces = useSpacesQuery(job.id, levelId);
  const systems = useSystemsQuery(job.id);
  const first = units.data?.pages[0];
  const rows = units.data?.pages.flatMap((p) => p.items) ?? [];
  const filtered = Boolean(filters.q || filters.spaceId || filters.systemId || filters.kind || filters.state);
  return (
    <>
      <View style={styles.head}>
        <AppText variant="small" muted>
          {job.name} · walk
        </AppText>
        <AppText variant="display" role="heading" testID="level-walk-name">
          {levelName}
        </AppText>
        <LevelPlanLink jobId={job.id} levelId={levelId} levelName={levelName} testID="level-walk-plan" />
      </View>
      {saved ? (
        <Notice tone="success" testID="level-walk-saved">
          {savedWords}
        </Notice>
      ) : null}
      {first ? <CoverageCard coverage={first.coverage} /> : null}
      <WalkBanner job={job} levelId={levelId} />
      <LevelWaiting jobId={job.id} unitTags={new Map(rows.map((u) => [u.id, u.tag]))} />
      <KeptLevelCard jobId={job.id} levelId={levelId} levelName={levelName} timeZone={job.timeZone} />
      <WalkFilters value={filters} onChange={onFiltersChange} spaces={spaces.data ?? []} systems={systems.data ?? []} />
      {units.isPending ? (
        <LoadingState label="Loading the units…" />
      ) : units.isLoadingError ? (
        <ErrorState message={units.error.message} onRetry={() => units.refetch()} />
      ) : rows.length === 0 ? (
        <EmptyState
          title={filtered ? 'No unit matches' : 'No units on this level'}
          body={filtered ? 'Change or clear the filters.' : 'A GC manager adds units in set-up (or imports the equipment schedule).'}
          testID="level-walk-empty"
        />
      ) : (
        <View style={styles.list} testID="level-walk-units">
          {filtered && first ? (
            <AppText variant="small" muted testID="level-walk-count">
              {first.counts.total} unit{first.counts.total === 1 ? '' : 's'} match · {first.counts.checked} checked
            </AppText>
          ) : null}
          {rows.map((u) => (
            <UnitRow key={u.id} jobId={job.id} levelId={levelId} unit={u} />
          ))}
          {units.hasNextPage ? (
            <Button label="Load more units" tone="secondary" testID="level-walk-more" busy={units.isFetchingNextPage} onPress={() => units.fetchNextPage()} />
          ) : null}
        </View>
      )}
      <View style={styles.links}>
        <Link href={links.newFinding(job.id, { levelId })} asChild>
          <Button label="Log a finding for this level (not one unit)" tone="secondary" testID="level-walk-level-finding" />
        </Link>
        <Link href={links.findings(job.id, { levelId })} asChild>
          <Button label={`Findings on ${levelName}`} tone="quiet" testID="level-walk-findings" />
        </Link>
      </View>
    </>
  );
}

function CoverageCard({ coverage }: { coverage: Coverage }) {
  const pct = coverage.total ? Math.round((coverage.checked / coverage.total) * 100) : 0;
  return (
    <Card testID="level-coverage">
      <View style={styles.coverageRow}>
        <AppText variant="title" testID="level-coverage-count">
          {coverage.checked} of {coverage.total} checked
        </AppText>
        <AppText variant="label" muted>
          {pct}%
        </AppText>
      </View>
      <View
        style={styles.bar}
        role="progressbar"
        aria-valuemin={0}
        aria-valuemax={coverage.total}
        aria-valuenow={coverage.checked}
        accessibilityLabel="Units checked"
      >
        <View style={[styles.barFill, { width: `${pct}%` }]} />
      </View>
      <AppText variant="small" muted testID="level-coverage-detail">
        {coverage.withOpenFindings} with open findings · {coverage.inProgress} in progress · {coverage.total - coverage.checked - coverage.inProgress} not checked
      </AppText>
    </Card>
  );
}

/** The inspector's own walk on this level: started by the first unit check, finished here. */
function WalkBanner({ job, levelId }: { job: JobDetail; levelId: string }) {
  const session = useSessionQuery();
  const open = useOpenWalkQuery(job.id, levelId, session.data?.user?.id);
  if (job.role === 'subcontractor' || !open.data) {
    return job.role === 'subcontractor' ? null : (
      <AppText variant="small" muted testID="walk-none">
        Your walk starts with your first unit check on this level.
      </AppText>
    );
  }
  return (
    <View style={styles.walk} testID="walk-open">
      <AppText style={styles.walkText}>
        Your walk started {formatWhen(open.data.startedAt, job.timeZone)} · {walkProgress(open.data)}
      </AppText>
      <FinishWalk job={job} walk={open.data} />
    </View>
  );
}

function UnitRow({ jobId, levelId, unit }: { jobId: string; levelId: string; unit: WalkUnitDto }) {
  const where = [unit.spaceName, unit.systemName].filter(Boolean).join(' · ');
  return (
    <Link href={links.unitCheck(jobId, unit.id)} asChild>
      <Pressable style={styles.row} testID={`walk-unit-${unit.tag}`} accessibilityRole="link">
        <View style={styles.rowMain}>
          <AppText variant="heading">{unit.tag}</AppText>
          <AppText variant="small" muted numberOfLines={1}>
            {unitKindLabel(unit.kind)}
            {where ? ` · ${where}` : ''}
          </AppText>
          <UnitStateBadge state={unit.state} openFindings={unit.openFindings} worstSeverity={unit.worstSeverity} testID={`walk-unit-${unit.tag}-state`} />
          <UnitWaiting jobId={jobId} unitId={unit.id} testID={`walk-unit-${unit.tag}-waiting`} />
          <AuditUnitMark jobId={jobId} levelId={levelId} unitId={unit.id} testID={`walk-unit-${unit.tag}-audit`} />
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
  coverageRow: { flexDirection: 'row', justifyContent: 'space-between', alignItems: 'baseline' },
  bar: { height: 12, borderRadius: 6, backgroundColor: colors.spruceSoft, overflow: 'hidden' },
  barFill: { height: 12, backgroundColor: colors.spruce },
  walk: {
    gap: space.xs,
    backgroundColor: colors.ochreSoft,
    borderRadius: radius.md,
    borderLeftWidth: 4,
    borderLeftColor: colors.ochre,
    paddingHorizontal: space.md,
    paddingTop: space.sm,
    paddingBottom: space.xs,
  },
  walkText: {},
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
    paddingVertical: space.sm,
  },
  rowMain: { flex: 1, gap: 4 },
  links: { gap: space.sm },
});
