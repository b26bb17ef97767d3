import { Link, useRouter } from 'expo-router';
import { Pressable, StyleSheet, View } from 'react-native';
import { mayStartJob } from '../../shared/rules/roles';
import type { SessionJob } from '../../shared/schemas/session';
import { useJobsQuery } from '../queries/jobs';
import { useSessionQuery } from '../queries/session';
import { colors, radius, space } from '../theme';
import { AppText } from '../ui/AppText';
import { Button } from '../ui/Button';
import { RoleBadge } from '../ui/RoleBadge';
import { Screen } from '../ui/Screen';
import { EmptyState, ErrorState, LoadingState } from '../ui/States';
import { links } from '../links';

export function JobListScreen() {
  const session = useSessionQuery();
  const jobs = useJobsQuery();
  const router = useRouter();
  const firstName = session.data?.user?.name.split(' ')[0];
  const newJob = () => router.push(links.newJob());
  // Jobs are set up by GC managers (or someone starting their first): others are not offered it.
  const canStartJob = mayStartJob((session.data?.jobs ?? []).map((j) => j.role));
  // Subcontractors on any job get their inbox: their company's findings across their jobs.
  const subcontractor = (session.data?.jobs ?? []).some((j) => j.role === 'subcontractor');

  return (
    <Screen testID="job-list-screen">
      <View style={styles.headRow}>
        <View style={styles.head}>
          <AppText variant="display" role="heading">
            Your jobs
          </AppText>
          {firstName ? <AppText muted>Signed in as {firstName}. Pick a job to work on.</AppText> : null}
        </View>
        {canStartJob && jobs.data && jobs.data.length > 0 ? <Button testID="new-job" label="New job" tone="secondary" onPress={newJob} /> : null}
      </View>
      {subcontractor ? (
        <Link href={links.inbox()} asChild>
          <Pressable style={styles.inbox} testID="home-inbox" accessibilityRole="link">
            <AppText variant="title" style={{ color: colors.paper }}>
              Findings to fix →
            </AppText>
            <AppText style={{ color: colors.paper }}>Your company’s findings on all your jobs, overdue first or by area.</AppText>
          </Pressable>
        </Link>
      ) : null}
      {jobs.isPending ? (
        <LoadingState label="Loading your jobs…" />
      ) : jobs.isError ? (
        <ErrorState message={jobs.error.message} onRetry={() => jobs.refetch()} />
      ) : jobs.data.length === 0 ? (
        <EmptyState
          title="No jobs yet"
          body="Create your first job to describe its levels, spaces, systems and units. If you were invited to someone else's job, it appears here once you accept."
          action={<Button testID="create-first-job" label="Create your first job" onPress={newJob} />}
        />
      ) : (
        <View style={styles.grid} testID="job-list">
          {jobs.data.map((job) => (
            <JobCard key={job.id} job={job} />
          ))}
        </View>
      )}
    </Screen>
  );
}

function JobCard({ job }: { job: SessionJob }) {
  return (
    <Link href={links.job(job.id)} asChild>
      <Pressable style={styles.card} testID={`job-card-${job.id}`} accessibilityRole="link">
        <View style={styles.cardTop}>
          <AppText variant="small" muted>
            {job.number ? `Job ${job.number}` : 'Job'}
          </AppText>
          <RoleBadge role={job.role} testID="job-role" />
        </View>
        <AppText variant="title">{job.name}</AppText>
        {job.address ? <AppText muted>{job.address}</AppText> : null}
      </Pressable>
    </Link>
  );
}

const styles = StyleSheet.create({
  head: { gap: space.xs, flexShrink: 1 },
  headRow: { flexDirection: 'row', flexWrap: 'wrap', justifyContent: 'space-between', alignItems: 'flex-end', gap: space.md },
  grid: { flexDirection: 'row', flexWrap: 'wrap', gap: space.md },
  card: {
    flexGrow: 1,
    // Shrinks below its basis on a narrow screen (a phone at 200% text is 195 px wide): nothing cut off.
    flexShrink: 1,
    minWidth: 0,
    flexBasis: 300,
    backgroundColor: colors.surface,
    borderRadius: radius.lg,
    borderWidth: 1,
    borderColor: colors.line,
    borderLeftWidth: 6,
    borderLeftColor: colors.spruce,
    padding: space.lg,
    gap: space.xs,
  },
  inbox: { backgroundColor: colors.spruce, borderRadius: radius.lg, padding: space.lg, gap: space.xs },
  cardTop: { flexDirection: 'row', flexWrap: 'wrap', justifyContent: 'space-between', alignItems: 'center', gap: space.sm },
});
