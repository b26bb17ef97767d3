import { Link } from 'expo-router';
import { StyleSheet, View } from 'react-native';
import { ROLE_LABELS } from '../../shared/words';
import { ApiError } from '../api/client';
import { useJobQuery } from '../queries/jobs';
import { colors, space } from '../theme';
import { AppText } from '../ui/AppText';
import { Card } from '../ui/Card';
import { RoleBadge } from '../ui/RoleBadge';
import { Screen } from '../ui/Screen';
import { EmptyState, ErrorState, LoadingState } from '../ui/States';

function formatDate(iso: string | null): string {
  if (!iso) return 'not set';
  const [y, m, d] = iso.split('-').map(Number);
  return new Date(Date.UTC(y!, m! - 1, d!)).toLocaleDateString(undefined, { timeZone: 'UTC', year: 'numeric', month: 'short', day: 'numeric' });
}

export function JobOverviewScreen({ jobId }: { jobId: string }) {
  const job = useJobQuery(jobId);
  return (
    <Screen testID="job-overview-screen">
      <Link href="/" style={styles.back}>
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
          <AppText variant="small" muted>
            Signed in as {ROLE_LABELS[job.data.role].toLowerCase()} on this job.
          </AppText>
        </>
      )}
    </Screen>
  );
}

const styles = StyleSheet.create({
  back: { alignSelf: 'flex-start', paddingVertical: space.xs },
  head: { gap: space.xs },
  row: { flexDirection: 'row', justifyContent: 'space-between', alignItems: 'center', gap: space.md, flexWrap: 'wrap', paddingVertical: space.xs },
});
