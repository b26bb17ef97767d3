import { Link } from 'expo-router';
import { StyleSheet, View } from 'react-native';
import { reportProgressText } from '../../shared/schemas/reports';
import { ApiError } from '../api/client';
import { ExportLink } from '../exports/ExportLink';
import { links } from '../links';
import { useReportRunQuery } from '../queries/reports';
import { colors, linkTarget, radius } from '../theme';
import { AppText } from '../ui/AppText';
import { Card } from '../ui/Card';
import { Screen } from '../ui/Screen';
import { EmptyState, ErrorState, LoadingState } from '../ui/States';

/** A report built in the background: "Building report: 340 of 1,200 findings", then the download. */
export function ReportProgressScreen({ jobId, reportId }: { jobId: string; reportId: string }) {
  const run = useReportRunQuery(jobId, reportId);
  const r = run.data;
  const share = r && r.findingsTotal > 0 ? Math.min(1, r.findingsDone / r.findingsTotal) : r?.status === 'done' ? 1 : 0;
  return (
    <Screen testID="report-screen" maxWidth={720}>
      <Link href={links.job(jobId)} style={linkTarget} testID="report-back">
        <AppText variant="label" style={{ color: colors.spruce }}>
          ← The job
        </AppText>
      </Link>
      <AppText variant="display" role="heading">
        Close-out report
      </AppText>
      {run.isPending ? (
        <LoadingState label="Loading the report…" />
      ) : run.isError ? (
        run.error instanceof ApiError && run.error.status === 404 ? (
          <EmptyState title="Report not found" body="Reports are kept for the person who asked for them, for 7 days." testID="report-not-found" />
        ) : (
          <ErrorState message={run.error.message} onRetry={() => run.refetch()} />
        )
      ) : r ? (
        <Card testID="report-card">
          <AppText variant="label">{r.scopeLabel}</AppText>
          <AppText testID="report-progress" role="status" aria-live="polite">
            {reportProgressText(r)}
          </AppText>
          {r.status === 'queued' || r.status === 'running' ? (
            <View
              style={styles.track}
              accessibilityRole="progressbar"
              accessibilityValue={{ min: 0, max: r.findingsTotal, now: r.findingsDone }}
              testID="report-bar"
            >
              <View style={[styles.fill, { width: `${Math.round(share * 100)}%` }]} />
            </View>
          ) : null}
          {r.status === 'queued' || r.status === 'running' ? (
            <AppText variant="small" muted>
              You can leave this page: a mail with the link comes when a large report is ready.
            </AppText>
          ) : null}
          {r.status === 'done' && r.download ? (
            <>
              <ExportLink href={r.download} label="Download the report (PDF)" testID="report-download" />
              <AppText variant="small" muted>
                {r.byteSize ? `${r.byteSize < 1_048_576 ? `${Math.ceil(r.byteSize / 1024)} KB` : `${(r.byteSize / 1_048_576).toFixed(1)} MB`}, ` : ''}
                {r.photosTotal} photos. Kept until {r.expiresAt ? new Date(r.expiresAt).toLocaleDateString() : 'a week from now'}.
              </AppText>
            </>
          ) : null}
          {r.status === 'done' && !r.download ? <AppText muted>This report was kept for 7 days and is gone: ask for it again.</AppText> : null}
          {r.status === 'failed' ? <AppText testID="report-failed">{r.message ?? 'Ask for it again.'}</AppText> : null}
        </Card>
      ) : null}
    </Screen>
  );
}

const styles = StyleSheet.create({
  track: { height: 12, borderRadius: radius.sm, backgroundColor: colors.line, overflow: 'hidden' },
  fill: { height: 12, backgroundColor: colors.spruce },
});
