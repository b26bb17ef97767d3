import { Link, useRouter } from 'expo-router';
import { StyleSheet, View } from 'react-native';
import { TEST_RECORD_KINDS, UNIT_TEST_KINDS, type TestRecordKind } from '../../shared/schemas/testRecords';
import { ApiError } from '../api/client';
import { links, type NewTestParams } from '../links';
import { isQueued } from '../outbox';
import { useJobQuery } from '../queries/jobs';
import { useLevelsQuery } from '../queries/levels';
import { useSystemsQuery } from '../queries/systems';
import { useTestRecordQuery, useTestUnitsQuery } from '../queries/testRecords';
import { colors, linkTarget, space } from '../theme';
import { AppText } from '../ui/AppText';
import { Button } from '../ui/Button';
import { Screen } from '../ui/Screen';
import { EmptyState, ErrorState, LoadingState } from '../ui/States';
import { kindLabel } from './format';
import { TestRecordForm } from './TestRecordForms';

const isKind = (k: string | undefined): k is TestRecordKind => (TEST_RECORD_KINDS as readonly string[]).includes(k ?? '');

/**
 * Record a test: the kind, and the system or unit, come from the address (a readiness line, the
 * test list, a failed record's "Record a re-test"); a correction opens with the record it replaces.
 */
export function NewTestRecordScreen({ jobId, params }: { jobId: string; params: NewTestParams }) {
  const router = useRouter();
  const job = useJobQuery(jobId);
  const supersedes = useTestRecordQuery(jobId, params.supersedesId ?? '');
  const kind = supersedes.data?.kind ?? (isKind(params.kind) ? params.kind : undefined);
  const systems = useSystemsQuery(jobId);
  const levels = useLevelsQuery(jobId);
  const units = useTestUnitsQuery(jobId, params.levelId && kind === 'drain' && !params.unitId ? { levelId: params.levelId } : {});
  const queries = [job, systems, levels, units, ...(params.supersedesId ? [supersedes] : [])];
  const failed = queries.find((q) => q.isError);
  const pending = queries.some((q) => q.isPending);
  const back = params.supersedesId ? links.testRecord(jobId, params.supersedesId) : links.tests(jobId, params.systemId ? { systemId: params.systemId } : {});
  return (
    <Screen testID="new-test-screen" maxWidth={680}>
      <Link href={back} style={styles.back} testID="new-test-back">
        <AppText variant="label" style={{ color: colors.spruce }}>
          ← {params.supersedesId ? 'The record' : 'Test records'}
        </AppText>
      </Link>
      <AppText variant="display" role="heading">
        {kind ? `Record a ${kindLabel(kind).toLowerCase()}` : 'Record a test'}
      </AppText>
      {failed ? (
        failed.error instanceof ApiError && failed.error.status === 404 ? (
          <EmptyState title="Not found" body="This job, or the record to correct, does not exist, or your company does not answer for it." testID="new-test-not-found" />
        ) : (
          <ErrorState message={failed.error?.message ?? ''} onRetry={() => void failed.refetch()} />
        )
      ) : pending ? (
        <LoadingState label="Loading…" />
      ) : job.data!.role === 'gc_manager' ? (
        <EmptyState
          title="Inspectors and the responsible company record tests"
          body="A GC manager witnesses records; the inspector or the company that answers for the system records them."
          testID="new-test-not-allowed"
        />
      ) : supersedes.data && (!supersedes.data.current || !supersedes.data.locked) ? (
        <EmptyState
          title={supersedes.data.current ? 'Not witnessed yet' : 'Already corrected'}
          body={supersedes.data.current ? 'Only a witnessed record is corrected; record a re-test instead.' : 'A later record already corrects this one: correct that one instead.'}
          testID="new-test-not-correctable"
        />
      ) : !kind ? (
        <View style={styles.kinds} testID="new-test-kinds">
          <AppText muted>Which test?</AppText>
          {TEST_RECORD_KINDS.map((k) => (
            <Link key={k} href={links.newTestRecord(jobId, { ...params, kind: k, ...(UNIT_TEST_KINDS.includes(k) ? { systemId: undefined } : { unitId: undefined }) })} asChild>
              <Button label={kindLabel(k)} tone="secondary" testID={`new-test-kind-${k}`} />
            </Link>
          ))}
        </View>
      ) : (
        <TestRecordForm
          job={job.data!}
          kind={kind}
          systems={systems.data ?? []}
          units={units.data ?? []}
          levels={levels.data ?? []}
          systemId={params.systemId}
          unitId={params.unitId}
          levelId={params.levelId}
          supersedes={supersedes.data}
          onRecorded={(r) => router.replace(isQueued(r) ? links.sync() : links.testRecord(jobId, r.id))}
          onCancel={() => router.replace(back)}
        />
      )}
    </Screen>
  );
}

const styles = StyleSheet.create({
  back: linkTarget,
  kinds: { gap: space.sm },
});
