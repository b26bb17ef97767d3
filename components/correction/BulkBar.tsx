import { useEffect, useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { REASON_MAX, bulkChangeSchema, type BulkChangeInput, type FindingDto } from '../../shared/schemas/findings';
import type { JobCompanyDto } from '../../shared/schemas/setup';
import { ApiError } from '../api/client';
import { bulkChangeWrite, useBulkChangeMutation } from '../queries/correction';
import { colors, radius, space } from '../theme';
import { AppText } from '../ui/AppText';
import { Button } from '../ui/Button';
import { Notice } from '../ui/Notice';
import { Segmented } from '../ui/Segmented';
import { Select } from '../ui/Select';
import { TextField } from '../ui/TextField';
import { ActionWrite } from './rules';

type Kind = 'reassign' | 'due';

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
  testID = 'bulk',
}: {
  jobId: string;
  selected: readonly string[];
  rows: readonly FindingDto[];
  companies: readonly JobCompanyDto[];
  onClear: () => void;
  testID?: string;
}) {
  const bulk = useBulkChangeMutation(jobId);
  const [slot] = useState(() => new ActionWrite());
  const [kind, setKind] = useState<Kind>('reassign');
  const [companyId, setCompanyId] = useState('');
  const [dueOn, setDueOn] = useState('');
  const [reason, setReason] = useState('');
  const [errors, setErrors] = useState<Record<string, string>>({});
  const [refusal, setRefusal] = useState<{ message: string; labels: string[] } | null>(null);
  const [done, setDone] = useState<string | null>(null);
  const byId = new Map(rows.map((r) => [r.id, r]));
  const anySelected = selected.length > 0;
  // A new selection starts a new change: the last result no longer applies.
  useEffect(() => {
    if (anySelected) setDone(null);
    else setRefusal(null);
  }, [anySelected]);

  function apply() {
    setRefusal(null);
    setDone(null);
    const r = reason.trim();
    const input: BulkChangeInput = {
      findingIds: [...selected],
      change: kind === 'reassign' ? { reassign: { companyId, reason: r } } : { dueOn: { to: dueOn.trim(), reason: r || undefined } },
    };
    const parsed = bulkChangeSchema.safeParse(input);
    if (!parsed.success) {
      const next: Record<string, string> = {};
      for (const i of parsed.error.issues) {
        const key = String(i.path[i.path.length - 1] ?? 'form');
        if (!next[key]) next[key] = i.message;
      }
      setErrors(next);
      return;
    }
    setErrors({});
    const w = slot.take(() => bulkChangeWrite(jobId, input));
    bulk.mutate(w, {
      onSuccess: (res) => {
        slot.settled();
        setDone(`${res.items.length} finding${res.items.length === 1 ? '' : 's'} ${kind === 'reassign' ? 'reassigned' : 'given the new due date'}.`);
        setReason('');
        onClear();
      },
      onError: (err) => {
        slot.settled(err);
        const labels = refusedIds(err).map((id) => byId.get(id)?.label ?? id);
        setRefusal({ message: err.message, labels });
      },
    });
  }

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
            onChange={(k) => {
              slot.settled();
              setKind(k);
              setErrors({});
            }}
            testID={`${testID}-kind`}
          />
        </View>
        <View style={styles.field}>
          {kind === 'reassign' ? (
            <Select
              label="To company"
              value={companyId}
              placeholder="Choose a company"
              options={companies.map((c) => ({ value: c.id, label: c.name }))}
              onChange={(v) => {
                slot.settled();
                setCompanyId(v);
              }}
              error={errors.companyId}
              testID={`${testID}-company`}
            />
          ) : (
            <TextField
              label="Due on (YYYY-MM-DD)"
              value={dueOn}
              onChangeText={(t) => {
                slot.settled();
                setDueOn(t);
              }}
              autoCapitalize="none"
              error={errors.to}
              testID={`${testID}-due`}
            />
          )}
        </View>
        <View style={styles.field}>
          <TextField
            label={kind === 'reassign' ? 'Reason' : 'Reason (optional)'}
            value={reason}
            onChangeText={(t) => {
              slot.settled();
              setReason(t);
            }}
            maxLength={REASON_MAX}
            error={errors.reason}
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
        onPress={apply}
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
