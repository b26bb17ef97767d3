import { useState } from 'react';
import { Link } from 'expo-router';
import { StyleSheet, View } from 'react-native';
import type { InboxGroup, InboxResponse } from '../../shared/schemas/findings';
import { ApiError } from '../api/client';
import { useInboxQuery, type InboxGrouping } from '../queries/correction';
import { colors, linkTarget, radius, space } from '../theme';
import { AppText } from '../ui/AppText';
import { Screen } from '../ui/Screen';
import { Segmented } from '../ui/Segmented';
import { EmptyState, ErrorState, LoadingState } from '../ui/States';
import { InboxCard } from './InboxCard';
import { links } from '../links';

/**
 * The subcontractor's inbox, phone first: their company's findings on all their jobs, overdue
 * first then by due date; "By area" groups them by level and space so a crew clears one area in
 * one visit instead of crossing the building.
 */
export function InboxScreen({ initialGrouping = 'none' }: { initialGrouping?: InboxGrouping }) {
  const [groupBy, setGroupBy] = useState<InboxGrouping>(initialGrouping);
  const inbox = useInboxQuery(groupBy);
  return (
    <Screen testID="inbox-screen" maxWidth={760}>
      <Link href={links.home()} style={styles.back} testID="inbox-back">
        <AppText variant="label" style={{ color: colors.spruce }}>
          ← Your jobs
        </AppText>
      </Link>
      <View style={styles.head}>
        <AppText variant="display" role="heading">
          Findings to fix
        </AppText>
        {inbox.data ? <Counts counts={inbox.data.counts} /> : null}
      </View>
      <Segmented
        label="Show"
        value={groupBy}
        options={[
          { value: 'none', label: 'Due first' },
          { value: 'area', label: 'By area' },
        ]}
        onChange={setGroupBy}
        testID="inbox-grouping"
      />
      {inbox.isPending ? (
        <LoadingState label="Loading your findings…" testID="inbox-loading" />
      ) : inbox.isError ? (
        inbox.error instanceof ApiError && inbox.error.status === 403 ? (
          <EmptyState title="No inbox for your role" body="The inbox lists a subcontractor's findings. Open a job to see its findings." testID="inbox-not-sub" />
        ) : (
          <ErrorState message={inbox.error.message} onRetry={() => inbox.refetch()} testID="inbox-error" />
        )
      ) : inbox.data.items.length === 0 ? (
        <EmptyState title="Nothing to fix" body="No open finding is assigned to your company. New ones show here." testID="inbox-empty" />
      ) : (
        <InboxList data={inbox.data} groupBy={groupBy} />
      )}
    </Screen>
  );
}

function Counts({ counts }: { counts: InboxResponse['counts'] }) {
  const parts = [
    `${counts.total} finding${counts.total === 1 ? '' : 's'}`,
    counts.overdue ? `${counts.overdue} overdue` : null,
    counts.returned ? `${counts.returned} returned` : null,
    counts.fixSubmitted ? `${counts.fixSubmitted} waiting for re-inspection` : null,
  ].filter(Boolean);
  return (
    <AppText muted testID="inbox-counts">
      {parts.join(' · ')}
    </AppText>
  );
}

function InboxList({ data, groupBy }: { data: InboxResponse; groupBy: InboxGrouping }) {
  const jobs = new Set(data.items.map((i) => i.jobId));
  const manyJobs = jobs.size > 1;
  if (groupBy === 'area' && data.groups) {
    return (
      <View style={styles.list} testID="inbox-groups">
        {data.groups.map((g) => (
          <AreaGroup key={`${g.jobId}-${g.levelId}-${g.spaceId ?? 'level'}`} group={g} showJob={manyJobs} />
        ))}
      </View>
    );
  }
  return (
    <View style={styles.list} testID="inbox-list">
      {data.items.map((item) => (
        <InboxCard key={item.id} item={item} showJob={manyJobs} />
      ))}
    </View>
  );
}

function AreaGroup({ group, showJob }: { group: InboxGroup; showJob: boolean }) {
  const overdue = group.items.filter((i) => i.overdue).length;
  return (
    <View style={styles.group} testID={`inbox-group-${group.levelId}-${group.spaceId ?? 'level'}`}>
      <View style={styles.groupHead}>
        <AppText variant="heading" role="heading">
          {group.levelName} · {group.spaceName ?? 'on the level'}
        </AppText>
        <AppText variant="small" muted>
          {showJob ? `${group.jobName} · ` : ''}
          {group.items.length} to fix{overdue ? ` · ${overdue} overdue` : ''}
        </AppText>
      </View>
      {group.items.map((item) => (
        <InboxCard key={item.id} item={item} showJob={false} showPlace={false} />
      ))}
    </View>
  );
}

const styles = StyleSheet.create({
  back: linkTarget,
  head: { gap: space.xs },
  list: { gap: space.md },
  group: { gap: space.sm, paddingTop: space.sm, borderTopWidth: 2, borderTopColor: colors.spruce, borderRadius: radius.sm },
  groupHead: { gap: 2 },
});
