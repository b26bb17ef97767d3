import { zodResolver } from '@hookform/resolvers/zod';
import { Link } from 'expo-router';
import { useEffect, useRef, useState } from 'react';
import { useForm } from 'react-hook-form';
import { StyleSheet, View } from 'react-native';
import { witnessTestRecordSchema, TEST_NOTE_LIMIT, type TestRecordDto, type WitnessTestRecordInput } from '../../shared/schemas/testRecords';
import type { Role } from '../../shared/words';
import { ApiError } from '../api/client';
import type { Write } from '../api/mutations';
import { writeErrorMessage } from '../api/writeErrors';
import { formatWhen } from '../findings/due';
import { PhotoStrip } from '../findings/PhotoStrip';
import { links } from '../links';
import { isQueued } from '../outbox';
import { useJobQuery } from '../queries/jobs';
import { useSessionQuery } from '../queries/session';
import { useTestRecordQuery, useTestRecordsQuery, useWitnessMutation, witnessWrite } from '../queries/testRecords';
import { colors, linkTarget, space } from '../theme';
import { AppText } from '../ui/AppText';
import { Button } from '../ui/Button';
import { Card } from '../ui/Card';
import { FormBanner } from '../ui/FormBanner';
import { FormText } from '../ui/FormFields';
import { Notice } from '../ui/Notice';
import { Screen } from '../ui/Screen';
import { EmptyState, ErrorState, LoadingState } from '../ui/States';
import { kindLabel, subjectOf } from './format';
import { ResultBadge, Row, TestCaution, WitnessBadge } from './parts';
import { TestFigures } from './TestFigures';

/** Who may witness (the server decides too: never the person who made the record). */
const WITNESSES: readonly Role[] = ['inspector', 'gc_manager'];
/** Who may record (and so correct): an inspector or the responsible company (the server checks which). */
const RECORDERS: readonly Role[] = ['inspector', 'subcontractor'];

/** One test record: what was typed, what Trimout computed, who recorded and witnessed it, its photos and its history. */
export function TestRecordScreen({ jobId, recordId }: { jobId: string; recordId: string }) {
  const job = useJobQuery(jobId);
  const record = useTestRecordQuery(jobId, recordId);
  const session = useSessionQuery();
  const failed = job.isError ? job.error : record.isError ? record.error : null;
  const r = record.data;
  return (
    <Screen testID="test-record-screen" maxWidth={760}>
      <Link href={links.tests(jobId, r?.system ? { systemId: r.system.id } : {})} style={styles.back} testID="test-record-back">
        <AppText variant="label" style={{ color: colors.spruce }}>
          ← Test records{r?.system ? ` of ${r.system.name}` : ''}
        </AppText>
      </Link>
      {failed ? (
        failed instanceof ApiError && failed.status === 404 ? (
          <EmptyState title="Record not found" body="It does not exist on this job, or your company does not answer for its system." testID="test-record-not-found" />
        ) : (
          <ErrorState message={failed.message} onRetry={() => void Promise.all([job.refetch(), record.refetch()])} />
        )
      ) : !job.data || !r ? (
        <LoadingState label="Loading the record…" />
      ) : (
        <RecordBody
          jobId={jobId}
          r={r}
          role={job.data.role}
          timeZone={job.data.timeZone}
          unitSystem={job.data.unitSystem}
          isRecorder={r.recordedBy.id === session.data?.user?.id}
          reload={() => void record.refetch()}
        />
      )}
    </Screen>
  );
}

function RecordBody({
  jobId,
  r,
  role,
  timeZone,
  unitSystem,
  isRecorder,
  reload,
}: {
  jobId: string;
  r: TestRecordDto;
  role: Role;
  timeZone: string;
  unitSystem: 'metric' | 'imperial';
  isRecorder: boolean;
  reload: () => void;
}) {
  const stage = (s: TestRecordDto['photos'][number]['stage']) => r.photos.filter((p) => p.stage === s);
  const groups = [
    { key: 'gauge_start', title: 'Gauge at the start', photos: stage('gauge_start') },
    { key: 'gauge_end', title: 'Gauge at the end', photos: stage('gauge_end') },
    { key: 'test', title: r.kind === 'pressure' ? 'Other photos' : 'Photos', photos: stage('test') },
  ].filter((g) => g.photos.length > 0);
  const target = r.unit ? { unitId: r.unit.id } : { systemId: r.system?.id };
  return (
    <>
      <View style={styles.head}>
        <AppText variant="label" muted testID="test-record-subject">
          {subjectOf(r)}
          {r.company ? ` · ${r.company.name}` : ''}
        </AppText>
        <AppText variant="display" role="heading" testID="test-record-title">
          {kindLabel(r.kind)}
        </AppText>
        <View style={styles.badges}>
          <ResultBadge result={r.result} testID="test-record-result" />
          <WitnessBadge record={r} testID="test-record-witness-state" />
        </View>
      </View>

      {r.result === 'failed' && r.reasons.length ? (
        <Notice tone="error" title="Why it failed" testID="test-record-reasons">
          {r.reasons.join('\n')}
        </Notice>
      ) : null}

      <TestCaution kind={r.kind} testID="test-record-caution" />

      <TestFigures record={r} unitSystem={unitSystem} />

      <Card>
        <Row label="Recorded" testID="test-record-recorded">
          {`${formatWhen(r.recordedAt, timeZone)} by ${r.recordedBy.name}`}
        </Row>
        {r.unit ? (
          <Row label="Unit">
            <Link href={links.unitCheck(jobId, r.unit.id)}>
              <AppText style={styles.link}>Unit {r.unit.tag}</AppText>
            </Link>
          </Row>
        ) : null}
        <Row label="Witnessed" testID="test-record-witnessed">
          {r.witnessedBy && r.witnessedAt ? `${formatWhen(r.witnessedAt, timeZone)} by ${r.witnessedBy.name}${r.witnessNote ? `: “${r.witnessNote}”` : ''}` : 'Not yet'}
        </Row>
        {r.note ? <Row label="Note">{r.note}</Row> : null}
      </Card>

      <View style={styles.section}>
        <AppText variant="title" role="heading">
          Photos ({r.photos.length})
        </AppText>
        {groups.length === 0 ? <AppText muted>No photos with this record.</AppText> : null}
        {groups.map((g) => (
          <View key={g.key} style={styles.group}>
            <AppText variant="label">{g.title}</AppText>
            <PhotoStrip
              testID={`test-record-photos-${g.key}`}
              photos={g.photos.map((p, i) => ({ key: p.id, thumbUri: p.thumbUrl, fullUri: p.url, label: `${g.title}, photo ${i + 1}` }))}
            />
          </View>
        ))}
      </View>

      {!r.current ? (
        <Notice tone="caution" title="Corrected" testID="test-record-corrected">
          A later record corrects this one; both stay in the history. The later one is the one that counts.
        </Notice>
      ) : null}

      {r.current && !r.locked && WITNESSES.includes(role) ? (
        isRecorder ? (
          <Notice tone="info" testID="test-record-own">
            You recorded this: another inspector or a GC manager witnesses it.
          </Notice>
        ) : (
          <WitnessForm jobId={jobId} record={r} reload={reload} />
        )
      ) : null}
      {r.current && !r.locked && role === 'subcontractor' ? (
        <AppText variant="small" muted testID="test-record-awaiting">
          An inspector or a GC manager witnesses it next; once witnessed it is locked.
        </AppText>
      ) : null}

      {r.current && RECORDERS.includes(role) ? (
        <View style={styles.actions}>
          {r.locked ? (
            <Link href={links.newTestRecord(jobId, { kind: r.kind, supersedesId: r.id })} asChild>
              <Button label="Record a correction" tone="secondary" testID="test-record-correct" />
            </Link>
          ) : null}
          {r.result === 'failed' ? (
            <Link href={links.newTestRecord(jobId, { kind: r.kind, ...target })} asChild>
              <Button label="Record a re-test" tone="secondary" testID="test-record-retest" />
            </Link>
          ) : null}
        </View>
      ) : null}

      <History jobId={jobId} r={r} timeZone={timeZone} />
    </>
  );
}

/** Every record of this kind for the same system or unit, newest first, corrected ones marked. */
function History({ jobId, r, timeZone }: { jobId: string; r: TestRecordDto; timeZone: string }) {
  const list = useTestRecordsQuery(jobId, { kind: r.kind, ...(r.unit ? { unitId: r.unit.id } : { systemId: r.system?.id }) });
  const items = list.data?.pages.flatMap((p) => p.items) ?? [];
  if (list.isPending || list.isError || items.length <= 1) return null;
  return (
    <Card testID="test-record-history">
      <AppText variant="title" role="heading">
        History
      </AppText>
      {items.map((x) => (
        <View key={x.id} style={styles.historyRow} testID={`test-record-history-${x.id}`}>
          {x.id === r.id ? (
            <AppText variant="label">
              {formatWhen(x.recordedAt, timeZone)} · this record
            </AppText>
          ) : (
            <Link href={links.testRecord(jobId, x.id)} style={linkTarget}>
              <AppText variant="label" style={styles.link}>
                {formatWhen(x.recordedAt, timeZone)} · {x.recordedBy.name}
              </AppText>
            </Link>
          )}
          <View style={styles.badges}>
            <ResultBadge result={x.result} />
            <WitnessBadge record={x} />
          </View>
        </View>
      ))}
    </Card>
  );
}

/** Witness the record (If-Match: the version on the screen). Someone else changed it meanwhile: say so and reload. */
function WitnessForm({ jobId, record, reload }: { jobId: string; record: TestRecordDto; reload: () => void }) {
  const witness = useWitnessMutation(jobId);
  const [stale, setStale] = useState(false);
  const [queued, setQueued] = useState(false);
  const { control, handleSubmit, setError, watch } = useForm<WitnessTestRecordInput>({ resolver: zodResolver(witnessTestRecordSchema), defaultValues: { note: '' } });
  const made = useRef<Write | null>(null);
  useEffect(() => {
    const sub = watch(() => {
      made.current = null;
    });
    return () => sub.unsubscribe();
  }, [watch]);
  // A new version on the screen is a new write.
  useEffect(() => {
    made.current = null;
  }, [record.version]);
  const submit = handleSubmit((values) => {
    setStale(false);
    const w = made.current ?? witnessWrite(jobId, record, { note: values.note?.trim() ? values.note : undefined }, `${kindLabel(record.kind)} · ${subjectOf(record)}`);
    made.current = w;
    witness.mutate(w, {
      onSuccess: (answer) => {
        made.current = null;
        if (isQueued(answer)) setQueued(true);
      },
      onError: (err) => {
        made.current = null;
        if (err instanceof ApiError && err.status === 412) {
          setStale(true);
          return;
        }
        setError('root', { message: writeErrorMessage(err) });
        if (err instanceof ApiError && err.status === 409) reload();
      },
    });
  });
  if (queued) {
    return (
      <Notice tone="info" title="Waiting to send" testID="test-record-witness-queued">
        Your witness is kept on this phone and is sent once there is signal.
      </Notice>
    );
  }
  return (
    <Card testID="test-record-witness">
      <AppText variant="title" role="heading">
        Witness this record
      </AppText>
      <AppText variant="small" muted>
        You confirm you saw the test as recorded. A witnessed record is locked: a later change is a correction, and the history keeps both. Trimout records what was observed; it
        does not certify the system.
      </AppText>
      {stale ? (
        <Notice tone="error" title="Changed meanwhile" testID="test-record-stale">
          <AppText>Someone changed this record while you were looking at it. Reload to see it as it is now, then witness it again.</AppText>
          <Button
            label="Reload"
            tone="secondary"
            testID="test-record-reload"
            onPress={() => {
              setStale(false);
              reload();
            }}
          />
        </Notice>
      ) : null}
      <FormText control={control} name="note" label="Note (optional)" testID="test-record-witness-note" limit={TEST_NOTE_LIMIT} compact />
      <FormBanner control={control} testID="test-record-witness-error" />
      <Button label="Witness" testID="test-record-witness-submit" busy={witness.isPending} onPress={submit} />
    </Card>
  );
}

const styles = StyleSheet.create({
  back: linkTarget,
  head: { gap: space.xs },
  badges: { flexDirection: 'row', flexWrap: 'wrap', alignItems: 'center', gap: space.sm },
  link: { color: colors.spruce, textDecorationLine: 'underline', fontWeight: '700' },
  section: { gap: space.sm },
  group: { gap: space.xs },
  actions: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm },
  historyRow: { gap: space.xs, paddingVertical: space.xs, borderBottomWidth: 1, borderBottomColor: colors.line },
});
