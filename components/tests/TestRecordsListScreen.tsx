import { Link } from 'expo-router';
import { Pressable, StyleSheet, View } from 'react-native';
import { TEST_RECORD_KINDS, TEST_RECORD_CAUTION, UNIT_TEST_KINDS, type TestRecordDto } from '../../shared/schemas/testRecords';
import type { Role } from '../../shared/words';
import { ApiError } from '../api/client';
import { formatWhen } from '../findings/due';
import { links } from '../links';
import { useJobQuery } from '../queries/jobs';
import { useSystemsQuery } from '../queries/systems';
import { useTestRecordsQuery, type TestFilters } from '../queries/testRecords';
import { colors, linkTarget, radius, space } from '../theme';
import { AppText } from '../ui/AppText';
import { Button } from '../ui/Button';
import { SafetyCaution } from '../ui/Notice';
import { Screen } from '../ui/Screen';
import { Select } from '../ui/Select';
import { EmptyState, ErrorState, LoadingState } from '../ui/States';
import { kindLabel, RESULT_WORDS, subjectOf } from './format';
import { ResultBadge, WitnessBadge } from './parts';
import { TestSettingsCard } from './TestSettingsCard';

const RECORDERS: readonly Role[] = ['inspector', 'subcontractor'];

/**
 * The job's test records, newest first, filtered in the address (system, unit, kind, result,
 * witnessed); each opens its record. Inspectors and subcontractors start a new record from here.
 */
export function TestRecordsListScreen({ jobId, filters, onFiltersChange }: { jobId: string; filters: TestFilters; onFiltersChange: (next: TestFilters) => void }) {
  const job = useJobQuery(jobId);
  const systems = useSystemsQuery(jobId);
  const list = useTestRecordsQuery(jobId, filters);
  const items = list.data?.pages.flatMap((p) => p.items) ?? [];
  const set = (patch: Partial<TestFilters>) => onFiltersChange({ ...filters, ...patch });
  const unitTag = filters.unitId ? items.find((r) => r.unit?.id === filters.unitId)?.unit?.tag : undefined;
  const system = filters.systemId ? systems.data?.find((s) => s.id === filters.systemId) : undefined;
  const role = job.data?.role;
  const failed = job.isError ? job.error : list.isError ? list.error : null;
  const filtered = Object.values(filters).some(Boolean);
  return (
    <Screen testID="tests-screen" maxWidth={860}>
      <Link href={links.job(jobId)} style={styles.back} testID="tests-back">
        <AppText variant="label" style={{ color: colors.spruce }}>
          ← {job.data?.name ?? 'Job'}
        </AppText>
      </Link>
      <View style={styles.head}>
        <AppText variant="display" role="heading">
          Test records
        </AppText>
        <AppText muted>Pressure tests, evacuations, charge records, drain tests and start-up records. Readiness waits for them.</AppText>
      </View>
      <SafetyCaution text={list.data?.pages[0]?.caution ?? TEST_RECORD_CAUTION} testID="tests-caution" />

      {role && RECORDERS.includes(role) ? (
        <View style={styles.newRow} testID="tests-new">
          {TEST_RECORD_KINDS.map((k) => (
            <Link
              key={k}
              href={links.newTestRecord(jobId, { kind: k, ...(UNIT_TEST_KINDS.includes(k) ? { unitId: filters.unitId } : { systemId: filters.systemId }) })}
              asChild
            >
              <Button label={`+ ${kindLabel(k)}`} tone="secondary" testID={`tests-new-${k}`} style={styles.grow} />
            </Link>
          ))}
        </View>
      ) : null}

      <View style={styles.filters} testID="tests-filters">
        <View style={styles.filter}>
          <Select
            label="System"
            testID="tests-filter-system"
            value={filters.systemId ?? ''}
            placeholder="Every system"
            options={(systems.data ?? []).map((s) => ({ value: s.id, label: s.name }))}
            onChange={(v) => set({ systemId: v || undefined })}
            compact
          />
        </View>
        <View style={styles.filter}>
          <Select
            label="Kind"
            testID="tests-filter-kind"
            value={filters.kind ?? ''}
            placeholder="Every kind"
            options={TEST_RECORD_KINDS.map((k) => ({ value: k, label: kindLabel(k) }))}
            onChange={(v) => set({ kind: (v || undefined) as TestFilters['kind'] })}
            compact
          />
        </View>
        <View style={styles.filter}>
          <Select
            label="Result"
            testID="tests-filter-result"
            value={filters.result ?? ''}
            placeholder="Any result"
            options={(['passed', 'failed', 'recorded'] as const).map((r) => ({ value: r, label: RESULT_WORDS[r] }))}
            onChange={(v) => set({ result: (v || undefined) as TestFilters['result'] })}
            compact
          />
        </View>
        <View style={styles.filter}>
          <Select
            label="Witness"
            testID="tests-filter-witnessed"
            value={filters.witnessed ?? ''}
            placeholder="Witnessed or not"
            options={[
              { value: 'true', label: 'Witnessed' },
              { value: 'false', label: 'Not witnessed' },
            ]}
            onChange={(v) => set({ witnessed: (v || undefined) as TestFilters['witnessed'] })}
            compact
          />
        </View>
      </View>
      <View style={styles.chips}>
        {filters.unitId ? (
          <Button label={`Unit ${unitTag ?? ''} ✕`} tone="quiet" testID="tests-filter-unit-clear" onPress={() => set({ unitId: undefined })} />
        ) : null}
        <Button
          label={filters.current ? 'Showing the records that count ✕' : 'Leave corrected records out'}
          tone="quiet"
          testID="tests-filter-current"
          onPress={() => set({ current: filters.current ? undefined : 'true' })}
        />
        {filtered ? <Button label="Clear filters" tone="quiet" testID="tests-filter-clear" onPress={() => onFiltersChange({})} /> : null}
      </View>

      {failed ? (
        failed instanceof ApiError && failed.status === 404 ? (
          <EmptyState title="Job not found" body="This job does not exist, or you are not a member of it." testID="tests-not-found" />
        ) : (
          <ErrorState message={failed.message} onRetry={() => void list.refetch()} testID="tests-error" />
        )
      ) : list.isPending ? (
        <LoadingState label="Loading test records…" testID="tests-loading" />
      ) : items.length === 0 ? (
        <EmptyState
          title={filtered ? 'No record matches' : 'No test records yet'}
          body={
            filtered
              ? `Nothing recorded${system ? ` for ${system.name}` : ''}${unitTag ? ` for unit ${unitTag}` : ''} with these filters.`
              : role === 'subcontractor'
                ? 'Records of the systems your company answers for appear here.'
                : 'Inspectors and the responsible company record tests; they appear here.'
          }
          testID="tests-empty"
        />
      ) : (
        <View style={styles.list} testID="tests-list">
          {items.map((r) => (
            <RecordCard key={r.id} jobId={jobId} r={r} timeZone={job.data?.timeZone ?? 'UTC'} />
          ))}
          {list.hasNextPage ? <Button label="Load more" tone="secondary" busy={list.isFetchingNextPage} onPress={() => void list.fetchNextPage()} testID="tests-more" /> : null}
        </View>
      )}
      {job.data ? <TestSettingsCard job={job.data} /> : null}
    </Screen>
  );
}

function RecordCard({ jobId, r, timeZone }: { jobId: string; r: TestRecordDto; timeZone: string }) {
  return (
    <Link href={links.testRecord(jobId, r.id)} asChild>
      <Pressable style={styles.card} accessibilityRole="link" testID={`test-row-${r.id}`}>
        <View style={styles.cardTop}>
          <AppText variant="heading" style={{ color: colors.spruce }}>
            {kindLabel(r.kind)} · {subjectOf(r)}
          </AppText>
        </View>
        <View style={styles.badges}>
          <ResultBadge result={r.result} />
          <WitnessBadge record={r} />
        </View>
        <AppText variant="small" muted>
          {formatWhen(r.recordedAt, timeZone)} · {r.recordedBy.name}
          {r.company ? ` · ${r.company.name}` : ''}
          {r.photos.length ? ` · ${r.photos.length} photo${r.photos.length === 1 ? '' : 's'}` : ''}
        </AppText>
        {r.result === 'failed' && r.reasons.length ? (
          <AppText variant="small" style={{ color: colors.danger }}>
            {r.reasons[0]}
          </AppText>
        ) : null}
      </Pressable>
    </Link>
  );
}

const styles = StyleSheet.create({
  back: linkTarget,
  head: { gap: space.xs },
  newRow: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm },
  grow: { flexGrow: 1, flexBasis: 150 },
  filters: { flexDirection: 'row', flexWrap: 'wrap', gap: space.md },
  filter: { flexGrow: 1, flexBasis: 160 },
  chips: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm },
  list: { gap: space.sm },
  card: { backgroundColor: colors.surface, borderRadius: radius.md, borderWidth: 1, borderColor: colors.line, padding: space.md, gap: space.xs },
  cardTop: { flexDirection: 'row', flexWrap: 'wrap', justifyContent: 'space-between', gap: space.sm },
  badges: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm },
});
