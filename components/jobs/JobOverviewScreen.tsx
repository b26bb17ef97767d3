import { Link, type Href } from 'expo-router';
import { Pressable, StyleSheet, View, useWindowDimensions } from 'react-native';
import { ROLE_LABELS } from '../../shared/words';
import { ApiError } from '../api/client';
import { BoardLink } from '../board/BoardLink';
import { useJobQuery } from '../queries/jobs';
import { READ_ONLY_SECTIONS, SETUP_SECTIONS, canEditSetup } from '../setup/SetupFrame';
import { colors, linkTarget, radius, space } from '../theme';
import { AppText } from '../ui/AppText';
import { Card } from '../ui/Card';
import { RoleBadge } from '../ui/RoleBadge';
import { Screen } from '../ui/Screen';
import { EmptyState, ErrorState, LoadingState } from '../ui/States';
import { JobWalkLinks } from '../walk/JobWalkLinks';
import { ReportActions } from '../reports/ReportActions';
import { links } from '../links';
import { SetupChecklist } from './SetupChecklist';

function formatDate(iso: string | null): string {
  if (!iso) return 'not set';
  const [y, m, d] = iso.split('-').map(Number);
  return new Date(Date.UTC(y!, m! - 1, d!)).toLocaleDateString(undefined, { timeZone: 'UTC', year: 'numeric', month: 'short', day: 'numeric' });
}

export function JobOverviewScreen({ jobId }: { jobId: string }) {
  const job = useJobQuery(jobId);
  return (
    <Screen testID="job-overview-screen">
      <Link href={links.home()} style={styles.back}>
        <AppText variant="label" style={{ color: colors.spruce }}>
          ← Your jobs
        </AppText>
      </Link>
      {job.isPending ? (
        <LoadingState label="Loading the job…" />
      ) : job.isError ? (
        job.error instanceof ApiError && job.error.status === 404 ? (
          <EmptyState title="Job not found" body="This job does not exist, or you are not a member of it." testID="job-not-found" />
        ) : (
          <ErrorState message={job.error.message} onRetry={() => job.refetch()} />
        )
      ) : (
        <>
          <View style={styles.head}>
            <AppText variant="small" muted>
              {job.data.number ? `Job ${job.data.number}` : 'Job'}
            </AppText>
            <AppText variant="display" role="heading" testID="job-name">
              {job.data.name}
            </AppText>
            {job.data.address ? <AppText muted>{job.data.address}</AppText> : null}
          </View>
          {canEditSetup(job.data) ? <SetupChecklist jobId={jobId} /> : null}
          <BoardLink jobId={jobId} role={job.data.role} />
          <ReportActions jobId={jobId} what="of the job" testID="job-reports" />
          <Card>
            <View style={styles.row}>
              <AppText variant="label">Your role</AppText>
              <RoleBadge role={job.data.role} />
            </View>
            <View style={styles.row}>
              <AppText variant="label">Dates</AppText>
              <AppText>
                {formatDate(job.data.startsOn)} – {formatDate(job.data.endsOn)}
              </AppText>
            </View>
            <View style={styles.row}>
              <AppText variant="label">Units shown in</AppText>
              <AppText>{job.data.unitSystem === 'metric' ? 'metric (mm, m, kg)' : 'imperial (ft-in, lb)'}</AppText>
            </View>
            <View style={styles.row}>
              <AppText variant="label">Time zone</AppText>
              <AppText>{job.data.timeZone}</AppText>
            </View>
          </Card>
          <JobWalkLinks jobId={jobId} role={job.data.role} />
          <SetupLinks jobId={jobId} editor={canEditSetup(job.data)} />
          <AppText variant="small" muted>
            Signed in as {ROLE_LABELS[job.data.role].toLowerCase()} on this job.
          </AppText>
        </>
      )}
    </Screen>
  );
}

/** GC managers get every set-up section (and the job's details); others read what they need. */
function SetupLinks({ jobId, editor }: { jobId: string; editor: boolean }) {
  const sections = SETUP_SECTIONS.filter((s) => editor || READ_ONLY_SECTIONS.includes(s.key));
  // Whole columns: a last card alone on its row keeps the width of the others.
  const { width } = useWindowDimensions();
  const columns = width >= 900 ? 3 : width >= 600 ? 2 : 1;
  const cell = { width: `${(100 - (columns - 1) * 2) / columns}%` as const };
  return (
    <View style={styles.setup} testID="job-setup-links">
      <View style={styles.setupHead}>
        <AppText variant="title" role="heading">
          {editor ? 'Set-up' : 'About this job'}
        </AppText>
        <AppText muted>
          {editor
            ? 'Describe the job before anyone walks a floor: levels, spaces, systems, units, companies, members and the defect catalogue.'
            : 'The job as its GC manager set it up. You can read these; only a GC manager changes them.'}
        </AppText>
      </View>
      <View style={styles.grid}>
        {editor ? <SectionLink href={links.setup(jobId, 'job')} label="Job details" blurb="Name, number, address, dates, time zone and units." testID="setup-link-job" cell={cell} /> : null}
        {sections.map((s) => (
          <SectionLink key={s.key} href={links.setup(jobId, s.key)} label={s.label} blurb={s.blurb} testID={`setup-link-${s.key}`} cell={cell} />
        ))}
      </View>
    </View>
  );
}

function SectionLink({ href, label, blurb, testID, cell }: { href: Href; label: string; blurb: string; testID: string; cell: { width: `${number}%` } }) {
  return (
    <Link href={href} asChild>
      <Pressable style={StyleSheet.flatten([styles.section, cell])} testID={testID} accessibilityRole="link">
        <AppText variant="heading" style={{ color: colors.spruce }}>
          {label} →
        </AppText>
        <AppText variant="small" muted>
          {blurb}
        </AppText>
      </Pressable>
    </Link>
  );
}

const styles = StyleSheet.create({
  setup: { gap: space.md },
  setupHead: { gap: space.xs },
  grid: { flexDirection: 'row', flexWrap: 'wrap', columnGap: '2%', rowGap: space.md },
  section: {
    backgroundColor: colors.surface,
    borderRadius: radius.md,
    borderWidth: 1,
    borderColor: colors.line,
    padding: space.lg,
    gap: space.xs,
  },
  back: linkTarget,
  head: { gap: space.xs },
  row: { flexDirection: 'row', justifyContent: 'space-between', alignItems: 'center', gap: space.md, flexWrap: 'wrap', paddingVertical: space.xs },
});
