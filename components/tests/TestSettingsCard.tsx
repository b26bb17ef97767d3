/**
 * The limits a job's test records are judged by (JobDetail.testSettings), each with its source,
 * and Trimout's stated default where the job sets none. A GC manager changes them here: PATCH
 * /api/jobs/:jobId `testSettings` with If-Match of the job as shown; a value and source both left
 * empty removes the setting (the default applies again). Only the settings changed are sent.
 */
import { zodResolver } from '@hookform/resolvers/zod';
import { useState } from 'react';
import { useForm, type Path, type Resolver } from 'react-hook-form';
import { StyleSheet, View } from 'react-native';
import type { JobDetail } from '../../shared/schemas/setup';
import { TEST_SETTING_KEYS, testSettingsInputSchema, type TestSettingKey, type TestSettingsInput } from '../../shared/schemas/testRecords';
import { ApiError } from '../api/client';
import { writeErrorMessage } from '../api/writeErrors';
import { useUpdateJobMutation } from '../queries/jobs';
import { colors, space } from '../theme';
import { AppText } from '../ui/AppText';
import { Button } from '../ui/Button';
import { Card } from '../ui/Card';
import { FormBanner } from '../ui/FormBanner';
import { FormText, preparedFor } from '../ui/FormFields';
import { Notice } from '../ui/Notice';

export const TEST_SETTING_WORDS: Record<TestSettingKey, { label: string; placeholder: string; byDefault: string }> = {
  atmosphericPressure: { label: 'Site atmospheric pressure', placeholder: 'e.g. 98.2 kPa or 29.0 inHg', byDefault: '101.325 kPa, the standard atmosphere (NIST SP 811)' },
  allowedPressureDrop: {
    label: 'Allowed pressure drop (after temperature correction)',
    placeholder: 'e.g. 2 psi or 10 kPa',
    byDefault: 'No drop beyond the gauge’s resolution after temperature correction (Trimout default)',
  },
  minPressureHold: { label: 'Minimum pressure-test hold', placeholder: 'e.g. 24 h', byDefault: 'No minimum hold' },
  targetVacuum: { label: 'Target vacuum', placeholder: 'e.g. 500 microns', byDefault: '500 microns: common practice, not a code value; the manual governs' },
  decayRiseLimit: { label: 'Decay test: rise allowed over the hold', placeholder: 'e.g. 500 microns', byDefault: '500 microns: common practice (from memory), not a code value' },
  minDecayHold: { label: 'Decay test: minimum hold', placeholder: 'e.g. 10 min', byDefault: '10 min: common practice (from memory), not a code value' },
};

type Draft = Record<TestSettingKey, { value: string; source: string }>;

function toDraft(job: JobDetail): Draft {
  const s = job.testSettings ?? {};
  return Object.fromEntries(TEST_SETTING_KEYS.map((k) => [k, { value: s[k]?.text ?? '', source: s[k]?.source ?? '' }])) as Draft;
}

/** Both empty: no setting (null, the default applies); otherwise what was typed, for the schema to check. */
function toInput(d: Draft): TestSettingsInput {
  return Object.fromEntries(TEST_SETTING_KEYS.map((k) => [k, d[k].value.trim() === '' && d[k].source.trim() === '' ? null : d[k]])) as TestSettingsInput;
}

const resolver = preparedFor(zodResolver(testSettingsInputSchema), toInput) as unknown as Resolver<Draft, unknown, TestSettingsInput>;

export function TestSettingsCard({ job, testID = 'test-settings' }: { job: JobDetail; testID?: string }) {
  const [editing, setEditing] = useState(false);
  const s = job.testSettings ?? {};
  return (
    <Card testID={testID}>
      <AppText variant="title" role="heading">
        Limits the tests are judged by
      </AppText>
      {editing ? (
        <SettingsForm job={job} onDone={() => setEditing(false)} testID={testID} />
      ) : (
        <>
          {TEST_SETTING_KEYS.map((k) => (
            <View key={k} style={styles.row} testID={`${testID}-${k}`}>
              <AppText variant="label">{TEST_SETTING_WORDS[k].label}</AppText>
              {s[k] ? (
                <AppText variant="small">
                  {s[k]!.text} · job setting: {s[k]!.source}
                </AppText>
              ) : (
                <AppText variant="small" muted>
                  {TEST_SETTING_WORDS[k].byDefault}
                </AppText>
              )}
            </View>
          ))}
          {job.role === 'gc_manager' ? <Button label="Change the limits" tone="secondary" testID={`${testID}-edit`} onPress={() => setEditing(true)} /> : null}
        </>
      )}
    </Card>
  );
}

function SettingsForm({ job, onDone, testID }: { job: JobDetail; onDone: () => void; testID: string }) {
  const update = useUpdateJobMutation(job.id);
  const [stale, setStale] = useState(false);
  const loaded = toDraft(job);
  const { control, handleSubmit, setError } = useForm<Draft, unknown, TestSettingsInput>({ resolver, defaultValues: loaded });
  const submit = handleSubmit(async (parsed) => {
    setStale(false);
    const before = toInput(loaded);
    // Only what changed: a setting another person set meanwhile is not overwritten by an unchanged field.
    const changed = Object.fromEntries(TEST_SETTING_KEYS.filter((k) => JSON.stringify(parsed[k] ?? null) !== JSON.stringify(before[k] ?? null)).map((k) => [k, parsed[k] ?? null]));
    if (Object.keys(changed).length === 0) return onDone();
    try {
      await update.mutateAsync({ input: { testSettings: changed }, version: job.version });
      onDone();
    } catch (err) {
      if (err instanceof ApiError && err.status === 412) {
        setStale(true);
        return;
      }
      const fields = err instanceof ApiError ? Object.entries(err.fields) : [];
      for (const [field, message] of fields) setError(field.replace(/^testSettings\./, '') as Path<Draft>, { message });
      setError('root', { message: writeErrorMessage(err, { fieldsShown: fields.length > 0 }) });
    }
  });
  return (
    <View style={styles.form}>
      <AppText variant="small" muted>
        Type each value with its unit and where it comes from (the manufacturer’s manual and page, or the code section the job follows). Leave both empty to use the default.
      </AppText>
      {stale ? (
        <Notice tone="error" title="Changed meanwhile" testID={`${testID}-stale`}>
          Someone changed this job while you were editing. Cancel to see it as it is now, then change the limits again.
        </Notice>
      ) : null}
      {TEST_SETTING_KEYS.map((k) => (
        <View key={k} style={styles.pair}>
          <AppText variant="label">{TEST_SETTING_WORDS[k].label}</AppText>
          <FormText control={control} name={`${k}.value`} label="Value" testID={`${testID}-${k}-value`} placeholder={TEST_SETTING_WORDS[k].placeholder} hint={`Default: ${TEST_SETTING_WORDS[k].byDefault}`} compact />
          <FormText control={control} name={`${k}.source`} label="Source" testID={`${testID}-${k}-source`} compact />
        </View>
      ))}
      <FormBanner control={control} testID={`${testID}-error`} />
      <Button label="Save the limits" testID={`${testID}-save`} busy={update.isPending} onPress={submit} />
      <Button label="Cancel" tone="quiet" testID={`${testID}-cancel`} onPress={onDone} />
    </View>
  );
}

const styles = StyleSheet.create({
  row: { gap: 2, paddingVertical: space.xs, borderBottomWidth: 1, borderBottomColor: colors.line },
  form: { gap: space.md },
  pair: { gap: space.xs },
});
