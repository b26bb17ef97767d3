import { Link } from 'expo-router';
import { Pressable, StyleSheet, View } from 'react-native';
import { AUDIT_SCHEME_LABELS } from '../../shared/schemas/audits';
import { ApiError } from '../api/client';
import { links } from '../links';
import { useAuditsQuery } from '../queries/audits';
import { useJobQuery } from '../queries/jobs';
import { colors, linkTarget, radius, space } from '../theme';
import { AppText } from '../ui/AppText';
import { Button } from '../ui/Button';
import { Screen } from '../ui/Screen';
import { EmptyState, ErrorState, LoadingState } from '../ui/States';
import { auditTitle, DecisionBadge } from './parts';

/** The job's sampling audits, newest first; a GC manager or inspector plans a new one from here. */
export function AuditsListScreen({ jobId }: { jobId: string }) {
  const job = useJobQuery(jobId);
  const list = useAuditsQuery(jobId);
  const failed = job.isError ? job.error : list.isError ? list.error : null;
  const items = list.data?.items ?? [];
  return (
    <Screen testID="audits-screen" maxWidth={860}>
      <Link href={links.job(jobId)} style={linkTarget} testID="audits-back">
        <AppText variant="label" style={{ color: colors.spruce }}>
          ← {job.data?.name ?? 'Job'}
        </AppText>
      </Link>
      <View style={styles.head}>
        <AppText variant="display" role="heading">
          Audits
        </AppText>
        <AppText muted>
          Spot checks of a lot of units: a random sample, drawn with a recorded seed, decides whether the lot is accepted or every unit is checked.
        </AppText>
      </View>
      <Link href={links.newAudit(jobId)} asChild>
        <Button label="Plan an audit" testID="audits-new" />
      </Link>
      {failed ? (
        failed instanceof ApiError && (failed.status === 404 || failed.status === 403) ? (
          <EmptyState
            title={failed.status === 403 ? 'Audits are for GC managers and inspectors' : 'Job not found'}
            body={failed.status === 403 ? 'Your findings list shows what is yours to fix.' : 'This job does not exist, or you are not a member of it.'}
            testID="audits-refused"
          />
        ) : (
          <ErrorState message={failed.message} onRetry={() => void list.refetch()} testID="audits-error" />
        )
      ) : list.isPending ? (
        <LoadingState label="Loading audits…" testID="audits-loading" />
      ) : items.length === 0 ? (
        <EmptyState title="No audits yet" body="Plan one: choose the lot by level, kind, system, crew or model, and a plan." testID="audits-empty" />
      ) : (
        <View style={styles.list} testID="audits-list">
          {items.map((a) => (
            <Link key={a.id} href={links.audit(jobId, a.id)} asChild>
              <Pressable style={styles.card} testID={`audit-row-${a.number}`} accessibilityRole="link">
                <AppText variant="heading">{auditTitle(a)}</AppText>
                <AppText muted>
                  {AUDIT_SCHEME_LABELS[a.scheme]}
                  {a.inspectionLevel ? `, level ${a.inspectionLevel}` : ''} · lot of {a.lotSize} · {a.checked} of {a.sampleSize} checked
                </AppText>
                <DecisionBadge decision={a.decision} testID={`audit-row-${a.number}-decision`} />
              </Pressable>
            </Link>
          ))}
        </View>
      )}
    </Screen>
  );
}

const styles = StyleSheet.create({
  head: { gap: space.xs, marginVertical: space.md },
  list: { gap: space.sm, marginTop: space.lg },
  card: { backgroundColor: colors.surface, borderRadius: radius.md, borderWidth: 1, borderColor: colors.line, padding: space.md, gap: space.xs },
});
