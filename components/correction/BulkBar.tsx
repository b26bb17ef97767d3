import { zodResolver } from '@hookform/resolvers/zod';
import { useEffect, useRef, useState } from 'react';
import { useForm } from 'react-hook-form';
import { StyleSheet, View } from 'react-native';
import { REASON_LIMIT, bulkChangeSchema, type BulkChangeInput, type BulkChangeParsed, type FindingDto } from '../../shared/schemas/findings';
import { dueOnProblem } from '../../shared/rules/pastDue';
import type { JobCompanyDto } from '../../shared/schemas/setup';
import type { Role } from '../../shared/words';
import { ApiError } from '../api/client';
import { BackdateChoice, backdatedFlag } from '../findings/BackdateChoice';
import { todayIn } from '../findings/due';
import { bulkChangeWrite, useBulkChangeMutation } from '../queries/correction';
import { colors, radius, space } from '../theme';
import { AppText } from '../ui/AppText';
import { Button } from '../ui/Button';
import { FormSelect, FormText, setServerFieldErrors } from '../ui/FormFields';
import { Notice } from '../ui/Notice';
import { Segmented } from '../ui/Segmented';
import { ActionWrite } from './rules';

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
});
