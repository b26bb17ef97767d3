import { zodResolver } from '@hookform/resolvers/zod';
import { useMemo } from 'react';
import { useForm } from 'react-hook-form';
import { StyleSheet, View } from 'react-native';
import { createJobSchema, type CreateJobInput } from '../../shared/schemas/setup';
import { FormSelect, FormText } from '../ui/FormFields';
import { showServerErrors } from '../setup/formErrors';
import { space } from '../theme';
import { Button } from '../ui/Button';
import { useWide } from '../ui/useWide';
import { FormBanner } from '../ui/FormBanner';

const FALLBACK_ZONES = [
  'UTC',
  'America/New_York',
  'America/Chicago',
  'America/Denver',
  'America/Los_Angeles',
  'America/Phoenix',
  'America/Anchorage',
  'Pacific/Honolulu',
  'America/Toronto',
  'America/Vancouver',
  'Europe/London',
  'Europe/Paris',
  'Australia/Sydney',
];

/** Every IANA zone this browser knows, with the browser's own first. */
export function timeZoneOptions(): { value: string; label: string }[] {
  const intl = Intl as typeof Intl & { supportedValuesOf?: (key: 'timeZone') => string[] };
  const zones = intl.supportedValuesOf ? intl.supportedValuesOf('timeZone') : FALLBACK_ZONES;
  const all = zones.includes('UTC') ? zones : ['UTC', ...zones];
  return all.map((z) => ({ value: z, label: z.replace(/_/g, ' ') }));
}

export function browserTimeZone(): string {
  try {
    return Intl.DateTimeFormat().resolvedOptions().timeZone || 'UTC';
  } catch {
    return 'UTC';
  }
}

const FIELDS = ['name', 'number', 'address', 'startsOn', 'endsOn', 'timeZone', 'unitSystem'] as const;

/** Name, number, address, dates, time zone and unit system: for a new job and for editing one. */
export function JobForm({
  initial,
  submitLabel,
  busy,
  onSubmit,
  testID = 'job-form',
}: {
  initial: CreateJobInput;
  submitLabel: string;
  busy: boolean;
  onSubmit: (values: CreateJobInput) => Promise<void>;
  testID?: string;
}) {
  const wide = useWide();
  const zones = useMemo(() => timeZoneOptions(), []);
  const { control, handleSubmit, setError } = useForm({
    resolver: zodResolver(createJobSchema),
    defaultValues: initial,
  });
  const submit = handleSubmit(async (values) => {
    try {
      await onSubmit(values);
    } catch (err) {
      showServerErrors(err, setError, FIELDS);
    }
  });
  const pair = wide ? styles.pair : null;
  return (
    <View testID={testID}>
      <FormBanner control={control} testID={`${testID}-error`} />
      <FormText control={control} name="name" label="Job name" testID="job-name-input" placeholder="e.g. Harbour Street Offices" />
      <View style={pair}>
        <View style={styles.cell}>
          <FormText control={control} name="number" label="Job number (optional)" testID="job-number-input" nullable />
        </View>
        <View style={styles.cell}>
          <FormText control={control} name="address" label="Address (optional)" testID="job-address-input" nullable />
        </View>
      </View>
      <View style={pair}>
        <View style={styles.cell}>
          <FormText
            control={control}
            name="startsOn"
            label="Start date (optional)"
            testID="job-starts-input"
            placeholder="YYYY-MM-DD"
            hint="As YYYY-MM-DD."
            nullable
          />
        </View>
        <View style={styles.cell}>
          <FormText
            control={control}
            name="endsOn"
            label="Finish date (optional)"
            testID="job-ends-input"
            placeholder="YYYY-MM-DD"
            hint="As YYYY-MM-DD."
            nullable
          />
        </View>
      </View>
      <View style={pair}>
        <View style={styles.cell}>
          <FormSelect control={control} name="timeZone" label="Time zone" testID="job-timezone-input" options={zones} hint="Due dates and digests follow the job's clock." />
        </View>
        <View style={styles.cell}>
          <FormSelect
            control={control}
            name="unitSystem"
            label="Show quantities in"
            testID="job-unit-system-input"
            options={[
              { value: 'imperial', label: 'Imperial (ft-in, lb, Btu/h)' },
              { value: 'metric', label: 'Metric (mm, m, kg, kW)' },
            ]}
          />
        </View>
      </View>
      <Button testID={`${testID}-submit`} label={submitLabel} onPress={submit} busy={busy} style={styles.submit} />
    </View>
  );
}

const styles = StyleSheet.create({
  pair: { flexDirection: 'row', gap: space.lg },
  cell: { flex: 1, minWidth: 0 },
  submit: { alignSelf: 'flex-start' },
});
