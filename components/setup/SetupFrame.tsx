import { Link } from 'expo-router';
import type { ReactNode } from 'react';
import { StyleSheet, View } from 'react-native';
import { ApiError } from '../api/client';
import { links, type SetupSection } from '../links';
import { useJobQuery, type JobDetail } from '../queries/jobs';
import { colors, linkTarget, space } from '../theme';
import { AppText } from '../ui/AppText';
import { Badge } from '../ui/Badge';
import { Screen } from '../ui/Screen';
import { EmptyState, ErrorState, LoadingState } from '../ui/States';
import { Tabs, type TabItem } from '../ui/Tabs';

export const SETUP_SECTIONS = [
  { key: 'levels', label: 'Levels', blurb: 'Floors in order; rename and reorder.' },
  { key: 'spaces', label: 'Spaces', blurb: 'Rooms and areas on each level, with floor area and ceiling height.' },
  { key: 'systems', label: 'Systems', blurb: 'Refrigerant circuits, their charge and the concentration check.' },
  { key: 'models', label: 'Unit models', blurb: 'Limits from each installation manual, with where they came from.' },
  { key: 'units', label: 'Units', blurb: 'The indoor unit register: tag, kind, model, capacity, where and on which system.' },
  { key: 'import', label: 'Import units', blurb: 'Bring in an equipment schedule from a CSV file.' },
  { key: 'companies', label: 'Companies', blurb: 'Companies on the job and the trades they cover.' },
  { key: 'crews', label: 'Crews', blurb: 'The teams within each company, and which units each installed.' },
  { key: 'members', label: 'Members', blurb: 'Who is on the job and with which role.' },
  { key: 'catalogue', label: 'Defect catalogue', blurb: 'The defect types this job checks.' },
  { key: 'settings', label: 'Job settings', blurb: 'Code editions, days to fix by severity, when a defect counts as recurring, job limits.' },
] as const satisfies readonly { key: SetupSection; label: string; blurb: string }[];
export type SetupSectionKey = SetupSection;

/** Sections everybody on the job may read; the rest (import) are GC-manager only. */
export const READ_ONLY_SECTIONS: readonly SetupSectionKey[] = ['levels', 'spaces', 'systems', 'models', 'units', 'companies', 'crews', 'members', 'catalogue', 'settings'];

export function canEditSetup(job: Pick<JobDetail, 'role'> | undefined): boolean {
  return job?.role === 'gc_manager';
}

/**
 * The frame of every set-up section: a way back to the job, the section's title, the section
 * tabs, and the job's own loading / not-found / error states. Children get the loaded job.
 */
export function SetupFrame({
  jobId,
  section,
  title,
  intro,
  testID,
  children,
  editor: editorOf,
}: {
  jobId: string;
  section: SetupSectionKey;
  title: string;
  intro?: string;
  testID: string;
  children: (job: JobDetail) => ReactNode;
  /** Who edits this section when it is not the GC manager alone (crews: a subcontractor names their own). */
  editor?: (job: JobDetail) => boolean;
}) {
  const job = useJobQuery(jobId);
  const setupEditor = canEditSetup(job.data);
  const editor = job.data && editorOf ? editorOf(job.data) : setupEditor;
  const tabs: TabItem[] = SETUP_SECTIONS.filter((s) => setupEditor || READ_ONLY_SECTIONS.includes(s.key)).map((s) => ({
    key: s.key,
    label: s.label,
    href: links.setup(jobId, s.key),
  }));
  return (
    <Screen testID={testID}>
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
            <Link href={links.job(jobId)} style={styles.back} testID="setup-back">
              <AppText variant="label" style={{ color: colors.spruce }} numberOfLines={1}>
                ← {job.data.name}
              </AppText>
            </Link>
            <View style={styles.titleRow}>
              <AppText variant="display" role="heading" testID="setup-title">
                {title}
              </AppText>
              {!editor ? <Badge label="Read only" tone="info" testID="setup-read-only" /> : null}
            </View>
            {intro ? <AppText muted>{intro}</AppText> : null}
          </View>
          {section !== 'job' ? <Tabs items={tabs} current={section} testID="setup-tabs" /> : null}
          {children(job.data)}
        </>
      )}
    </Screen>
  );
}

const styles = StyleSheet.create({
  head: { gap: space.xs },
  back: linkTarget,
  titleRow: { flexDirection: 'row', alignItems: 'center', gap: space.md, flexWrap: 'wrap' },
});
