import { zodResolver } from '@hookform/resolvers/zod';
import { Link, type Href } from 'expo-router';
import { useMemo, useRef, useState } from 'react';
import { Controller, useForm, useWatch } from 'react-hook-form';
import { StyleSheet, View } from 'react-native';
import type { z } from 'zod';
import {
  DIGEST_FREQUENCY_LABELS,
  DIGEST_FREQUENCIES,
  WEEKDAYS,
  WEEKDAY_LABELS,
  preferencesFormSchema,
  type DigestNowResponse,
  type PreferencesDto,
  type PreferencesForm,
} from '../../shared/schemas/preferences';
import { digestScheduleSentence } from '../../shared/digestSchedule';
import type { Write } from '../api/mutations';
import { timeZoneOptions } from '../jobs/JobForm';
import { newDigestNowWrite, useDigestNowMutation, usePreferencesQuery, useSavePreferencesMutation } from '../queries/preferences';
import { writeErrorMessage } from '../api/writeErrors';
import { showServerErrors } from '../setup/formErrors';
import { colors, space } from '../theme';
import { AppText } from '../ui/AppText';
import { Button } from '../ui/Button';
import { Card } from '../ui/Card';
import { FormSelect } from '../ui/FormFields';
import { Notice } from '../ui/Notice';
import { Screen } from '../ui/Screen';
import { Segmented } from '../ui/Segmented';
import { ErrorState, LoadingState } from '../ui/States';
import { FormBanner } from '../ui/FormBanner';

const FIELDS = ['digestFrequency', 'digestWeekday', 'digestHour', 'timeZone', 'criticalAssignmentMail'] as const;
type FormInput = z.input<typeof preferencesFormSchema>;

const HOUR_OPTIONS = Array.from({ length: 24 }, (_, h) => ({ value: String(h), label: `${String(h).padStart(2, '0')}:00` }));
const WEEKDAY_OPTIONS = WEEKDAYS.map((d) => ({ value: String(d), label: WEEKDAY_LABELS[d]! }));
const FREQUENCY_OPTIONS = DIGEST_FREQUENCIES.map((f) => ({ value: f, label: DIGEST_FREQUENCY_LABELS[f] }));

/** /preferences: how often the digest comes, when, and the critical-finding mail; "send me a digest now". */
export function PreferencesScreen() {
  const prefs = usePreferencesQuery();
  // Kept here: the editor re-mounts on each new version, a successful save included.
  const [savedVersion, setSavedVersion] = useState<number | null>(null);
  return (
    <Screen testID="preferences-screen">
      <View style={styles.head}>
        <AppText variant="display" role="heading">
          Mail preferences
        </AppText>
        <AppText muted>The digest is a summary of the findings that wait on you, by mail, at the hour you choose.</AppText>
      </View>
      {prefs.isPending ? (
        <LoadingState label="Loading your preferences…" testID="preferences-loading" />
      ) : prefs.isError ? (
        <ErrorState message={prefs.error.message} onRetry={() => prefs.refetch()} testID="preferences-error" />
      ) : (
        <>
          {/* Re-mount on a new version so a reload after 412 shows the current preferences. */}
          <PreferencesEditor key={prefs.data.version} prefs={prefs.data} saved={savedVersion === prefs.data.version} onSaved={setSavedVersion} />
          <DigestNow mailboxPath={prefs.data.mailboxPath} weekly={prefs.data.digestFrequency === 'weekly'} />
        </>
      )}
    </Screen>
  );
}

function toForm(p: PreferencesDto): FormInput {
  return {
    digestFrequency: p.digestFrequency,
    digestWeekday: String(p.digestWeekday),
    digestHour: String(p.digestHour),
    timeZone: p.timeZone,
    criticalAssignmentMail: p.criticalAssignmentMail,
  };
}

function PreferencesEditor({ prefs, saved, onSaved }: { prefs: PreferencesDto; saved: boolean; onSaved: (version: number) => void }) {
  const save = useSavePreferencesMutation();
  const zones = useMemo(() => timeZoneOptions(), []);
  const { control, handleSubmit, setError } = useForm<FormInput, unknown, PreferencesForm>({
    resolver: zodResolver(preferencesFormSchema),
    defaultValues: toForm(prefs),
  });
  const frequency = useWatch({ control, name: 'digestFrequency' });
  const onSubmit = handleSubmit(async (values) => {
    try {
      // The time zone stays "the first job's" unless it was changed here.
      const patch = { ...values, timeZone: prefs.timeZoneIsDefault && values.timeZone === prefs.timeZone ? null : values.timeZone };
      const next = await save.mutateAsync({ patch, version: prefs.version });
      onSaved(next.version);
    } catch (err) {
      showServerErrors(err, setError, FIELDS);
    }
  });
  return (
    <Card testID="preferences-form">
      <AppText variant="title">Digest</AppText>
      {/* The saved schedule, in the words the digest mail itself uses. */}
      <AppText testID="preferences-schedule">
        {digestScheduleSentence({ frequency: prefs.digestFrequency, weekday: prefs.digestWeekday, hour: prefs.digestHour, timeZone: prefs.timeZone })}
      </AppText>
      <Controller
        control={control}
        name="digestFrequency"
        render={({ field }) => (
          <Segmented label="How often" value={field.value} options={FREQUENCY_OPTIONS} onChange={field.onChange} testID="preferences-frequency" />
        )}
      />
      {frequency === 'weekly' ? (
        <FormSelect control={control} name="digestWeekday" label="On" testID="preferences-weekday" options={WEEKDAY_OPTIONS} />
      ) : null}
      {frequency !== 'off' ? (
        <>
          <FormSelect control={control} name="digestHour" label="At" testID="preferences-hour" options={HOUR_OPTIONS} hint="Local time, in the time zone below." />
          <FormSelect
            control={control}
            name="timeZone"
            label="Time zone"
            testID="preferences-timezone"
            options={zones}
            hint={prefs.timeZoneIsDefault ? "Your first job's time zone, until you choose another." : undefined}
          />
        </>
      ) : (
        <AppText muted testID="preferences-digest-off">
          No digest is sent. You can still send yourself one below.
        </AppText>
      )}
      <AppText variant="title" style={styles.section}>
        Critical findings
      </AppText>
      <Controller
        control={control}
        name="criticalAssignmentMail"
        render={({ field }) => (
          <Segmented
            label="Mail me at once when a critical finding is assigned to my company"
            value={field.value ? 'on' : 'off'}
            options={[
              { value: 'on', label: 'On' },
              { value: 'off', label: 'Off' },
            ]}
            onChange={(v) => field.onChange(v === 'on')}
            testID="preferences-critical"
          />
        )}
      />
      <AppText variant="small" muted>
        For subcontractors: sent to each person of the company on that job.
      </AppText>
      {/* Next to the button: on a phone the top of the form is out of sight by now. */}
      <FormBanner control={control} testID="preferences-save-error" />
      {saved ? (
        <Notice tone="success" testID="preferences-saved">
          Saved.
        </Notice>
      ) : null}
      <Button testID="preferences-save" label="Save preferences" onPress={onSubmit} busy={save.isPending} />
    </Card>
  );
}

function DigestNow({ mailboxPath, weekly }: { mailboxPath: string | null; weekly: boolean }) {
  const send = useDigestNowMutation();
  // One write per press: a retry of the same press reuses its Idempotency-Key.
  const write = useRef<Write | null>(null);
  const [result, setResult] = useState<DigestNowResponse | null>(null);
  const [error, setErrorText] = useState<string | null>(null);
  const onPress = async () => {
    setErrorText(null);
    setResult(null);
    write.current ??= newDigestNowWrite();
    try {
      setResult(await send.mutateAsync(write.current));
      write.current = null;
    } catch (err) {
      setErrorText(writeErrorMessage(err));
    }
  };
  return (
    <Card testID="digest-now">
      <AppText variant="title">Try it</AppText>
      <AppText muted testID="digest-now-period">
        {weekly
          ? "Sends you this week's digest now (the last 7 days), as your saved settings choose, whatever the day and hour."
          : "Sends you today's digest now (the last 24 hours), whatever the day and hour set above."}
      </AppText>
      <Button testID="digest-now-send" label="Send me a digest now" tone="secondary" onPress={onPress} busy={send.isPending} />
      {error ? (
        <Notice tone="error" testID="digest-now-error">
          {error}
        </Notice>
      ) : null}
      {result ? (
        <Notice tone="success" testID="digest-now-sent" title="On its way">
          <AppText>
            “{result.subject}” to {result.to}.
          </AppText>
        </Notice>
      ) : null}
      {mailboxPath ? (
        <AppText variant="small" muted testID="digest-now-mailbox-note">
          This demo server catches every mail instead of delivering it: read them on the{' '}
          <Link href={mailboxPath as Href} style={styles.link} testID="digest-now-mailbox-link">
            caught-mail page ({mailboxPath})
          </Link>
          .
        </AppText>
      ) : null}
    </Card>
  );
}

const styles = StyleSheet.create({
  head: { gap: space.sm },
  section: { marginTop: space.md },
  link: { color: colors.spruce, textDecorationLine: 'underline' },
});
