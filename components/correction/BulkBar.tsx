import { zodResolver } from '@hookform/resolvers/zod';
import { Link } from 'expo-router';
import { useEffect, useMemo, useRef, useState } from 'react';
import { useForm } from 'react-hook-form';
import { Image, StyleSheet, View } from 'react-native';
import type { z } from 'zod';
import {
  NOTE_LIMIT,
  REASON_LIMIT,
  bulkChangeSchema,
  submitFixSchema,
  type BulkChangeInput,
  type BulkChangeParsed,
  type FindingDto,
  type SubmitFixInput,
} from '../../shared/schemas/findings';
import { dueOnProblem } from '../../shared/rules/pastDue';
import type { JobCompanyDto } from '../../shared/schemas/setup';
import type { Role } from '../../shared/words';
import { ApiError } from '../api/client';
import { BackdateChoice, backdatedFlag } from '../findings/BackdateChoice';
import { todayIn } from '../findings/due';
import { writeErrorMessage } from '../api/writeErrors';
import { MAX_PHOTOS } from '../findings/FindingForm';
import type { PickedPhoto } from '../findings/PhotoPicker.types';
import { links } from '../links';
import { labelWrite } from '../outbox';
import { bulkChangeWrite, reinspectionWrite, submitFixWrite, useBulkChangeMutation, useEachFindingWriteMutation, type EachOutcome } from '../queries/correction';
import { colors, radius, space } from '../theme';
import { AppText } from '../ui/AppText';
import { Button } from '../ui/Button';
import { FormPhotos, FormSelect, FormText, setServerFieldErrors, withFormOnly } from '../ui/FormFields';
import { Notice } from '../ui/Notice';
import { Segmented } from '../ui/Segmented';
import { ActionWrite, FINDING_WRITE_WORDS } from './rules';

type Kind = 'reassign' | 'due';

interface Typed {
  companyId?: string;
  dueOn: string;
  reason: string;
}

/** The change for all, filled with what was typed (kept while switching between the two). */
function changeFor(kind: Kind, t: Typed): BulkChangeInput['change'] {
  return kind === 'reassign' ? { reassign: { companyId: t.companyId as string, reason: t.reason } } : { dueOn: { to: t.dueOn, reason: t.reason } };
}

function typedFrom(change: BulkChangeInput['change'], before: Typed): Typed {
  return {
    companyId: change.reassign ? change.reassign.companyId : before.companyId,
    dueOn: change.dueOn?.to ?? before.dueOn,
    reason: change.reassign?.reason ?? change.dueOn?.reason ?? before.reason,
  };
}

/** The ids a refusal names (fields.findingIds, comma-separated). */
export function refusedIds(err: unknown): string[] {
  if (!(err instanceof ApiError)) return [];
  const ids = err.fields.findingIds;
  return ids ? ids.split(',').filter(Boolean) : [];
}

/**
 * A bulk change for the findings ticked in the table: reassign them, or give them a new due
 * date. All or nothing: when the server refuses any of them, nothing changes and the refusal
 * lists which ones and why.
 */
export function BulkBar({
  jobId,
  selected,
  rows,
  companies,
  onClear,
  role = 'inspector',
  timeZone = 'UTC',
  testID = 'bulk',
}: {
  jobId: string;
  selected: readonly string[];
  rows: readonly FindingDto[];
  companies: readonly JobCompanyDto[];
  onClear: () => void;
  /** The caller's role on the job: a GC manager may back-date a due date on purpose. */
  role?: Role;
  /** The job's time zone: "today" for a new due date. */
  timeZone?: string;
  testID?: string;
}) {
  const bulk = useBulkChangeMutation(jobId);
  const [slot] = useState(() => new ActionWrite());
  const [kind, setKind] = useState<Kind>('reassign');
  const [refusal, setRefusal] = useState<{ message: string; labels: string[] } | null>(null);
  const [done, setDone] = useState<string | null>(null);
  const [backdate, setBackdate] = useState(false);
  const today = todayIn(timeZone);
  const typed = useRef<Typed>({ dueOn: '', reason: '' });
  const { control, handleSubmit, setValue, getValues, setError, reset, watch } = useForm<BulkChangeInput, unknown, BulkChangeParsed>({
    resolver: zodResolver(bulkChangeSchema),
    defaultValues: { findingIds: [...selected], change: changeFor('reassign', typed.current) },
  });
  // Any change of the content (another selection included) makes a new write.
  useEffect(() => {
    const sub = watch(() => slot.settled());
    return () => sub.unsubscribe();
  }, [watch, slot]);
  const byId = new Map(rows.map((r) => [r.id, r]));
  const anySelected = selected.length > 0;
  const selection = selected.join(',');
  // A new selection starts a new change: the last result no longer applies.
  useEffect(() => {
    if (anySelected) setDone(null);
    else setRefusal(null);
  }, [anySelected]);
  useEffect(() => {
    if (getValues('findingIds').join(',') !== selection) setValue('findingIds', selection ? selection.split(',') : []);
  }, [selection, getValues, setValue]);

  function choose(next: Kind) {
    typed.current = typedFrom(getValues('change'), typed.current);
    setKind(next);
    reset({ findingIds: getValues('findingIds'), change: changeFor(next, typed.current) });
  }

  const apply = handleSubmit(({ findingIds, change }) => {
      const t = typedFrom(change, typed.current);
      if (kind === 'due') {
        // The server refuses a date before today on the job's clock; say so at the field first.
        const problem = dueOnProblem({ dueOn: t.dueOn, backdated: backdate, role, today });
        if (problem) {
          setError('change.dueOn.to', { type: 'validate', message: problem.message });
          return;
        }
      }
      const input: BulkChangeInput = {
        findingIds,
        change:
          kind === 'reassign'
            ? { reassign: { companyId: t.companyId as string, reason: t.reason } }
            : { dueOn: { to: t.dueOn, reason: t.reason || undefined, ...backdatedFlag(backdate, t.dueOn, today) } },
      };
      const w = slot.take(() => bulkChangeWrite(jobId, input));
      bulk.mutate(w, {
        onSuccess: (res) => {
          slot.settled();
          setDone(`${res.items.length} finding${res.items.length === 1 ? '' : 's'} ${kind === 'reassign' ? 'reassigned' : 'given the new due date'}.`);
          typed.current = { ...t, reason: '' };
          reset({ findingIds: getValues('findingIds'), change: changeFor(kind, typed.current) });
          onClear();
        },
        onError: (err) => {
          slot.settled(err);
          setServerFieldErrors(err, setError, ['change.reassign.companyId', 'change.reassign.reason', 'change.dueOn.to', 'change.dueOn.reason']);
          const labels = refusedIds(err).map((id) => byId.get(id)?.label ?? id);
          setRefusal({ message: err.message, labels });
        },
      });
  });
  const press = () => {
    setRefusal(null);
    setDone(null);
    void apply();
  };

  if (selected.length === 0) {
    return (
      <View style={styles.idle}>
        {done ? (
          <Notice tone="success" testID={`${testID}-done`}>
            {done}
          </Notice>
        ) : null}
        <AppText variant="small" muted testID={`${testID}-hint`}>
          Tick findings in the table to reassign them or change their due date all at once.
        </AppText>
      </View>
    );
  }
  return (
    <View style={styles.bar} testID={testID}>
      <View style={styles.top}>
        <AppText variant="heading" testID={`${testID}-count`}>
          {selected.length} selected
        </AppText>
        <Button label="Clear selection" tone="quiet" onPress={onClear} testID={`${testID}-clear`} />
      </View>
      <View style={styles.fields}>
        <View style={styles.kind}>
          <Segmented
            label="Change for all"
            value={kind}
            options={[
              { value: 'reassign', label: 'Reassign' },
              { value: 'due', label: 'Due date' },
            ]}
            onChange={choose}
            testID={`${testID}-kind`}
          />
        </View>
        <View style={styles.field}>
          {kind === 'reassign' ? (
            <FormSelect
              control={control}
              name="change.reassign.companyId"
              label="To company"
              placeholder="Choose a company"
              options={companies.map((c) => ({ value: c.id, label: c.name }))}
              testID={`${testID}-company`}
            />
          ) : (
            <View>
              <FormText control={control} name="change.dueOn.to" label="Due on (YYYY-MM-DD)" autoCapitalize="none" testID={`${testID}-due`} />
              <BackdateChoice dueOn={watch('change.dueOn.to')} today={today} role={role} value={backdate} onChange={setBackdate} testID={`${testID}-backdate`} />
            </View>
          )}
        </View>
        <View style={styles.field}>
          <FormText
            key={kind}
            control={control}
            name={kind === 'reassign' ? 'change.reassign.reason' : 'change.dueOn.reason'}
            label={kind === 'reassign' ? 'Reason' : 'Reason (optional)'}
            limit={REASON_LIMIT}
            testID={`${testID}-reason`}
          />
        </View>
      </View>
      {refusal ? (
        <Notice tone="error" title="Nothing was changed" testID={`${testID}-refused`}>
          <AppText style={{ color: colors.danger }}>{refusal.message}</AppText>
          {refusal.labels.length ? (
            <AppText variant="small" testID={`${testID}-refused-list`}>
              Refused: {refusal.labels.join(', ')}
            </AppText>
          ) : null}
        </Notice>
      ) : null}
      <Button
        label={`Apply to ${selected.length} finding${selected.length === 1 ? '' : 's'}`}
        busy={bulk.isPending}
        disabled={selected.length === 0}
        onPress={press}
        testID={`${testID}-apply`}
      />
    </View>
  );
}

const styles = StyleSheet.create({
  bar: { backgroundColor: colors.surface, borderWidth: 1.5, borderColor: colors.spruce, borderRadius: radius.lg, padding: space.lg, gap: space.sm },
  idle: { gap: space.sm },
  top: { flexDirection: 'row', justifyContent: 'space-between', alignItems: 'center', gap: space.md },
  fields: { flexDirection: 'row', flexWrap: 'wrap', columnGap: space.lg, alignItems: 'flex-start' },
  kind: { flexBasis: 220 },
  field: { flexGrow: 1, flexBasis: 240 },
  pair: { flexDirection: 'row', gap: space.md, alignItems: 'center', borderTopWidth: 1, borderTopColor: colors.line, paddingTop: space.sm },
  pairText: { flex: 1, gap: 2 },
  thumb: { width: 72, height: 72, borderRadius: radius.md, backgroundColor: colors.line },
});

/** "#12, #14" from the rows' labels. */
function labelsOf(ids: readonly string[], rows: readonly FindingDto[]): string {
  const byId = new Map(rows.map((r) => [r.id, r.label]));
  return ids.map((id) => byId.get(id) ?? id).join(', ');
}

/** The sentence after several writes: how many went, how many wait on the phone, which were refused and why. */
function eachSummary(outcomes: readonly EachOutcome[], rows: readonly FindingDto[], done: string): { ok: string | null; refused: string | null } {
  const sent = outcomes.filter((o) => 'sent' in o).map((o) => o.findingId);
  const kept = outcomes.filter((o) => 'kept' in o).map((o) => o.findingId);
  const refused = outcomes.filter((o): o is Extract<EachOutcome, { refused: unknown }> => 'refused' in o);
  const ok = [
    sent.length ? `${done}: ${labelsOf(sent, rows)}.` : '',
    kept.length ? `Kept on this phone, sent when there is signal: ${labelsOf(kept, rows)}.` : '',
  ]
    .filter(Boolean)
    .join(' ');
  const no = refused.map((o) => `${labelsOf([o.findingId], rows)}: ${writeErrorMessage(o.refused, FINDING_WRITE_WORDS)}`).join(' ');
  return { ok: ok || null, refused: no || null };
}

/**
 * A subcontractor's fix for several findings at once: one note and the same photos sent as a
 * fix of EACH ticked finding (each gets its own fix record, as if submitted one by one; the photos
 * are stored with each). A finding that needs a new measurement, or that someone changed meanwhile,
 * is refused on its own and named; the others are sent.
 */
export function BulkFixBar({
  jobId,
  selected,
  rows,
  onClear,
  testID = 'bulk-fix',
}: {
  jobId: string;
  selected: readonly string[];
  rows: readonly FindingDto[];
  onClear: () => void;
  testID?: string;
}) {
  const each = useEachFindingWriteMutation(jobId);
  const [result, setResult] = useState<{ ok: string | null; refused: string | null } | null>(null);
  const resolver = useMemo(
    () =>
      withFormOnly<SubmitFixInput, unknown, z.output<typeof submitFixSchema>, { photos: PickedPhoto[] }>(zodResolver(submitFixSchema), {
        photos: (photos) => (photos.length === 0 ? 'Add at least one photo of the fixed work.' : undefined),
      }),
    [],
  );
  const { control, handleSubmit, reset } = useForm<SubmitFixInput & { photos: PickedPhoto[] }, unknown, z.output<typeof submitFixSchema> & { photos: PickedPhoto[] }>({
    resolver,
    defaultValues: { note: '', photos: [] },
  });
  const open = selected.filter((id) => rows.find((r) => r.id === id)?.status === 'open');
  const notOpen = selected.filter((id) => !open.includes(id));
  const send = handleSubmit(({ photos, ...values }) => {
    setResult(null);
    const writes = open.map((findingId) => ({
      findingId,
      write: labelWrite(submitFixWrite(jobId, findingId, { note: values.note }, photos), labelsOf([findingId], rows)),
    }));
    each.mutate(writes, {
      onSuccess: (outcomes) => {
        setResult(eachSummary(outcomes, rows, 'Fix sent for'));
        if (outcomes.every((o) => !('refused' in o))) {
          reset({ note: '', photos: [] });
          onClear();
        }
      },
    });
  });
  return (
    <View style={styles.bar} testID={testID}>
      {result?.ok ? (
        <Notice tone="success" testID={`${testID}-done`}>
          {result.ok}
        </Notice>
      ) : null}
      {result?.refused ? (
        <Notice tone="error" title="Not sent" testID={`${testID}-refused`}>
          {result.refused}
        </Notice>
      ) : null}
      {selected.length === 0 ? (
        <AppText variant="small" muted testID={`${testID}-hint`}>
          Tick several findings to send one fix note and the same photos for each of them.
        </AppText>
      ) : (
        <>
          <View style={styles.top}>
            <AppText variant="heading" testID={`${testID}-count`}>
              One fix for {open.length} finding{open.length === 1 ? '' : 's'}
            </AppText>
            <Button label="Clear selection" tone="quiet" onPress={onClear} testID={`${testID}-clear`} />
          </View>
          {notOpen.length ? (
            <AppText variant="small" muted testID={`${testID}-skipped`}>
              Not open, left out: {labelsOf(notOpen, rows)}.
            </AppText>
          ) : null}
          <FormText control={control} name="note" label="What was fixed (the same on each)" multiline limit={NOTE_LIMIT} testID={`${testID}-note`} compact />
          <FormPhotos control={control} name="photos" label="Photos of the fixed work, sent with each" photoLabel="Fix photo" testID={testID} max={MAX_PHOTOS} tooMany={`At most ${MAX_PHOTOS} photos with a fix.`} />
          <Button
            label={`Send the fix for ${open.length} finding${open.length === 1 ? '' : 's'}`}
            disabled={open.length === 0}
            busy={each.isPending}
            onPress={() => void send()}
            testID={`${testID}-send`}
          />
        </>
      )}
    </View>
  );
}

/**
 * An inspector accepts several fixes at once, after looking at each: every ticked finding waiting
 * for re-inspection is listed with its photo as logged and a link to its page (fix photos beside
 * the defect's), and is accepted with its own If-Match; one someone changed meanwhile is refused
 * on its own and named. Returning stays one by one: each return needs its own reason.
 */
export function BulkAcceptBar({
  jobId,
  selected,
  rows,
  onClear,
  testID = 'bulk-accept',
}: {
  jobId: string;
  selected: readonly string[];
  rows: readonly FindingDto[];
  onClear: () => void;
  testID?: string;
}) {
  const each = useEachFindingWriteMutation(jobId);
  const [result, setResult] = useState<{ ok: string | null; refused: string | null } | null>(null);
  const waiting = rows.filter((r) => selected.includes(r.id) && r.status === 'fix_submitted');
  const others = selected.filter((id) => !waiting.some((r) => r.id === id));
  function accept() {
    setResult(null);
    const writes = waiting.map((f) => ({ findingId: f.id, write: labelWrite(reinspectionWrite(jobId, f.id, f.version, { verdict: 'accept' }), f.label) }));
    each.mutate(writes, {
      onSuccess: (outcomes) => {
        setResult(eachSummary(outcomes, rows, 'Accepted'));
        if (outcomes.every((o) => !('refused' in o))) onClear();
      },
    });
  }
  return (
    <View style={styles.bar} testID={testID}>
      {result?.ok ? (
        <Notice tone="success" testID={`${testID}-done`}>
          {result.ok}
        </Notice>
      ) : null}
      {result?.refused ? (
        <Notice tone="error" title="Not accepted" testID={`${testID}-refused`}>
          {result.refused}
        </Notice>
      ) : null}
      {selected.length === 0 ? (
        <AppText variant="small" muted testID={`${testID}-hint`}>
          Tick fixes waiting for re-inspection to accept them together, after looking at each.
        </AppText>
      ) : (
        <>
          <View style={styles.top}>
            <AppText variant="heading" testID={`${testID}-count`}>
              Accept {waiting.length} fix{waiting.length === 1 ? '' : 'es'}
            </AppText>
            <Button label="Clear selection" tone="quiet" onPress={onClear} testID={`${testID}-clear`} />
          </View>
          {others.length ? (
            <AppText variant="small" muted testID={`${testID}-skipped`}>
              Not waiting for re-inspection, left out: {labelsOf(others, rows)}.
            </AppText>
          ) : null}
          {waiting.map((f) => (
            <View key={f.id} style={styles.pair} testID={`${testID}-item-${f.label}`}>
              {f.thumbUrl ? <Image source={{ uri: f.thumbUrl }} style={styles.thumb} accessibilityLabel={`Photo of ${f.label} as logged`} /> : null}
              <View style={styles.pairText}>
                <AppText variant="heading">
                  {f.label} {f.unitTag ?? ''}
                </AppText>
                <AppText variant="small" muted>
                  {f.code} {f.title}
                </AppText>
                <Link href={links.finding(jobId, f.id)} testID={`${testID}-look-${f.label}`}>
                  <AppText variant="small" style={{ color: colors.spruce, textDecorationLine: 'underline' }}>
                    Look at the defect and fix photos
                  </AppText>
                </Link>
              </View>
            </View>
          ))}
          <Button
            label={`Accept ${waiting.length} fix${waiting.length === 1 ? '' : 'es'}`}
            disabled={waiting.length === 0}
            busy={each.isPending}
            onPress={accept}
            testID={`${testID}-send`}
          />
        </>
      )}
    </View>
  );
}

type Many = 'change' | 'accept';

/**
 * What can be done to the ticked findings, on the wide table and on a phone's cards alike: a GC
 * manager or inspector changes them (reassign, due date) or accepts their fixes; a subcontractor
 * sends one fix for them.
 */
export function ManyAtOnce({
  jobId,
  role,
  selected,
  rows,
  companies,
  timeZone,
  onClear,
}: {
  jobId: string;
  role: Role;
  selected: readonly string[];
  rows: readonly FindingDto[];
  companies: readonly JobCompanyDto[];
  timeZone?: string;
  onClear: () => void;
}) {
  const [many, setMany] = useState<Many>('change');
  if (role === 'subcontractor') return <BulkFixBar jobId={jobId} selected={selected} rows={rows} onClear={onClear} />;
  return (
    <View style={styles.idle} testID="many">
      <Segmented
        label="With the ticked findings"
        value={many}
        options={[
          { value: 'change', label: 'Change' },
          { value: 'accept', label: 'Accept fixes' },
        ]}
        onChange={setMany}
        testID="many-kind"
      />
      {many === 'change' ? (
        <BulkBar jobId={jobId} selected={selected} rows={rows} companies={companies} role={role} timeZone={timeZone} onClear={onClear} />
      ) : (
        <BulkAcceptBar jobId={jobId} selected={selected} rows={rows} onClear={onClear} />
      )}
    </View>
  );
}
