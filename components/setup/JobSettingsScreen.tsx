/**
 * Job settings for the GC manager: code editions, due days per severity, when a defect type is
 * flagged recurring, and the job's own limits. One form, one PATCH /api/jobs/:jobId with If-Match
 * of the version the form was filled from. A 412 (someone else changed the job) says so, loads
 * the current job and keeps what was typed; a 400 puts the server's messages at their fields.
 * Other roles see the values read-only (the server answers 403 to their writes anyway).
 */
import { zodResolver } from '@hookform/resolvers/zod';
import { useQueryClient } from '@tanstack/react-query';
import { Link } from 'expo-router';
import { useRef, useState } from 'react';
import { useForm, type FieldPath, type UseFormSetError } from 'react-hook-form';
import { StyleSheet, View } from 'react-native';
import { CODE_DOCUMENTS, JOB_SETTINGS, type CodeDocument } from '../../shared/catalogue/types';
import { KNOWN_EDITIONS, type JobDetail } from '../../shared/schemas/setup';
import { SEVERITIES, SEVERITY_LABELS } from '../../shared/words';
import { ApiError } from '../api/client';
import { jobKeys, useUpdateJobMutation } from '../queries/jobs';
import { colors, space } from '../theme';
import { AppText } from '../ui/AppText';
import { Button } from '../ui/Button';
import { Card } from '../ui/Card';
import { FormSelect, FormText } from '../ui/FormFields';
import { Notice } from '../ui/Notice';
import { useWide } from '../ui/useWide';
import {
  changedPaths,
  differingFields,
  flattenForm,
  recurringRuleWords,
  settingsFormSchema,
  settingsPatch,
  shareToPercent,
  toSettingsForm,
  type SettingsFormOutput,
  type SettingsFormValues,
} from './jobSettingsForm';
import { links } from '../links';
import { SetupFrame, canEditSetup } from './SetupFrame';

/** What each code document is, in a few words. */
export const CODE_DOCUMENT_WORDS: Record<CodeDocument, string> = {
  IMC: 'International Mechanical Code: condensate drains, pipe supports, appliance access and working space (306), refrigerant quantities.',
  IRC: 'International Residential Code: one- and two-family dwellings and townhouses; its mechanical chapters (working space M1305) apply there instead of the IMC.',
  'NFPA 70': 'National Electrical Code: disconnects within sight of the unit (440.14); its working space (110.26) is for electrical equipment, not appliance service.',
  'ASHRAE 34': 'Refrigerant safety groups and concentration limits.',
  'IEC 60335-2-40': 'Heat pump and air-conditioner safety: A2L (R-32) floor areas.',
};

const LIMIT_PLACEHOLDER: Record<string, string> = { slope: 'e.g. 1/8 in/ft or 1%', length: "e.g. 4' or 1.2 m" };

export function JobSettingsScreen({ jobId }: { jobId: string }) {
  return (
    <SetupFrame
      jobId={jobId}
      section="settings"
      title="Job settings"
      intro="The rules this job is checked by: code editions, how long each severity has to be fixed, when a defect type counts as recurring, and the job's own limits."
      testID="job-settings-screen"
    >
      {(job) => (canEditSetup(job) ? <SettingsForm job={job} /> : <SettingsReadOnly job={job} />)}
    </SetupFrame>
  );
}

/** Time zone and unit system live on the job details form (JobForm); here they are only named. */
function ClockLine({ job, editor }: { job: JobDetail; editor: boolean }) {
  return (
    <Card testID="settings-clock">
      <AppText variant="heading">Time zone</AppText>
      <AppText testID="settings-timezone">{job.timeZone.replace(/_/g, ' ')}</AppText>
      <AppText variant="small" muted>
        Due dates count whole days on this clock, and digests go out by it.
      </AppText>
      {editor ? (
        <Link href={links.setup(job.id, 'job')} style={styles.link} testID="settings-job-details-link">
          <AppText variant="label" style={{ color: colors.spruce }}>
            Change it under Job details →
          </AppText>
        </Link>
      ) : null}
    </Card>
  );
}

// ---------------------------------------------------------------------------------------------
// Editing (GC manager)
// ---------------------------------------------------------------------------------------------

type Conflict = { message: string; differing: string[] };

function SettingsForm({ job }: { job: JobDetail }) {
  const wide = useWide();
  const queryClient = useQueryClient();
  const update = useUpdateJobMutation(job.id);
  /** The version the values on screen were loaded from: the If-Match of the next save. */
  const [baseVersion, setBaseVersion] = useState(job.version);
  const [saved, setSaved] = useState<string | null>(null);
  const [conflict, setConflict] = useState<Conflict | null>(null);
  // The fields hold text; the schema hands the submit handler numbers and a share (SettingsFormOutput).
  // The form is typed by its fields so the shared FormText/FormSelect bind to it.
  /** The saved values the form was last filled from (to tell the user's changes from someone else's). */
  const loaded = useRef(toSettingsForm(job));
  const { control, handleSubmit, formState, setError, watch, reset, getValues, setValue, clearErrors } = useForm<SettingsFormValues, unknown, SettingsFormOutput>({
    resolver: zodResolver(settingsFormSchema),
    defaultValues: toSettingsForm(job),
  });

  const submit = handleSubmit(async (parsed) => {
    const values = parsed;
    setSaved(null);
    setConflict(null);
    const patch = settingsPatch(job, values);
    if (Object.keys(patch).length === 0) {
      setSaved('Nothing changed: the settings are as saved.');
      return;
    }
    try {
      const fresh = await update.mutateAsync({ input: patch, version: baseVersion });
      setBaseVersion(fresh.version);
      loaded.current = toSettingsForm(fresh);
      reset(loaded.current);
      setSaved('Saved. New findings use these settings; findings already logged keep their due dates.');
    } catch (err) {
      if (err instanceof ApiError && err.status === 412) {
        // Load the job as it is now; the typed values stay in the form.
        await queryClient.refetchQueries({ queryKey: jobKeys.detail(job.id) });
        const current = queryClient.getQueryData<JobDetail>(jobKeys.detail(job.id));
        const typed = getValues();
        let theirs: string[] = [];
        if (current) {
          // Fields the user changed keep what was typed; the others take the saved values now.
          const now = toSettingsForm(current);
          const mine = changedPaths(loaded.current, typed);
          theirs = differingFields(loaded.current, now);
          setBaseVersion(current.version);
          loaded.current = now;
          reset(now);
          const flat = flattenForm(typed);
          for (const path of mine) setValue(path as FieldPath<SettingsFormValues>, flat[path]!, { shouldDirty: true });
        }
        setConflict({
          message:
            'Someone else changed this job while you were editing. Their changes are loaded; the fields you changed keep what you typed. Check them and press Save again.',
          differing: theirs,
        });
        return;
      }
      showSettingsErrors(err, setError);
    }
  });

  const rootError = formState.errors.root?.message;
  const fieldErrors = Object.keys(formState.errors).some((k) => k !== 'root');
  const dueError = formState.errors.severityDueDays?.message;
  const minUnits = watch('recurringThresholds.minUnits');
  const minShare = watch('recurringThresholds.minShare');
  const row = wide ? styles.row : null;

  return (
    <View style={styles.body} testID="settings-form">
      <ClockLine job={job} editor />

      <Card testID="settings-rules">
        <AppText variant="heading" role="heading" aria-level={2}>
          Rules
        </AppText>
        <AppText variant="label">Days to fix, by severity</AppText>
        <AppText variant="small" muted testID="settings-due-days-words">
          A new finding is due this many days after the day it is logged, on the job's clock; critical ≤ major ≤ minor.
        </AppText>
        <View style={styles.days}>
          {SEVERITIES.map((s) => (
            <View key={s} style={styles.day}>
              <FormText
                control={control}
                name={`severityDueDays.${s}`}
                label={SEVERITY_LABELS[s]}
                testID={`settings-due-${s}`}
                keyboardType="number-pad"
                inputMode="numeric"
                hint="days"
              />
            </View>
          ))}
        </View>
        {dueError ? (
          <AppText variant="small" role="alert" style={styles.error} testID="settings-due-days-error">
            {dueError}
          </AppText>
        ) : null}

        <View style={styles.divider} />
        <AppText variant="label">Recurring defects</AppText>
        <AppText variant="small" muted testID="settings-recurring-words">
          {recurringRuleWords(minUnits ?? '', minShare ?? '')}
        </AppText>
        <View style={styles.days}>
          <View style={styles.day}>
            <FormText
              control={control}
              name="recurringThresholds.minUnits"
              label="Minimum units"
              testID="settings-recurring-units"
              keyboardType="number-pad"
              inputMode="numeric"
              hint="From 2 to 1000"
            />
          </View>
          <View style={styles.day}>
            <FormText
              control={control}
              name="recurringThresholds.minShare"
              label="Minimum %"
              testID="settings-recurring-share"
              keyboardType="decimal-pad"
              inputMode="decimal"
              hint="Of checked units; 10 means 10 %"
            />
          </View>
        </View>
      </Card>

      <Card testID="settings-editions">
        <AppText variant="heading" role="heading" aria-level={2}>
          Code editions
        </AppText>
        <AppText variant="small" muted>
          Measured checks use the limits of the edition chosen here: pick the one the authority having jurisdiction enforces on this job.
        </AppText>
        <View style={row}>
          {CODE_DOCUMENTS.map((d) => (
            <View key={d} style={wide ? styles.third : null}>
              <FormSelect
                control={control}
                name={`codeEditions.${d}` as FieldPath<SettingsFormValues>}
                label={d}
                testID={`settings-edition-${d.replace(/\s+/g, '-')}`}
                hint={CODE_DOCUMENT_WORDS[d]}
                options={KNOWN_EDITIONS[d].map((e) => ({ value: e, label: e }))}
              />
            </View>
          ))}
        </View>
      </Card>

      <Card testID="settings-limits">
        <AppText variant="heading" role="heading" aria-level={2}>
          Job limits
        </AppText>
        <AppText variant="small" muted>
          Catalogue rules that name a job limit check against it instead of the code value. Type it with its unit and say where it
          came from; leave both empty to have none.
        </AppText>
        {JOB_SETTINGS.map((def) => (
          <View key={def.key} style={[styles.limit, row]} testID={`settings-limit-${def.key}`}>
            <View style={styles.cell}>
              <FormText
                control={control}
                name={`settings.${def.key}.value`}
                label={def.label.replace(' (job setting)', '')}
                testID={`settings-limit-${def.key}-value`}
                placeholder={LIMIT_PLACEHOLDER[def.quantity]}
              />
            </View>
            <View style={styles.cell}>
              <FormText
                control={control}
                name={`settings.${def.key}.source`}
                label="Source"
                testID={`settings-limit-${def.key}-source`}
                placeholder="e.g. job spec 23 05 29, p. 4"
              />
            </View>
          </View>
        ))}
      </Card>

      {conflict ? (
        <Notice tone="error" title="Changed by someone else" testID="settings-conflict">
          <AppText style={{ color: colors.danger }}>{conflict.message}</AppText>
          {conflict.differing.length > 0 ? (
            <AppText variant="small" testID="settings-conflict-fields">
              Changed by them: {conflict.differing.join(', ')}.
            </AppText>
          ) : null}
        </Notice>
      ) : null}
      {rootError ? (
        <Notice tone="error" testID="settings-error">
          {rootError}
        </Notice>
      ) : fieldErrors ? (
        <Notice tone="error" testID="settings-invalid">
          Nothing was saved: check the fields marked above.
        </Notice>
      ) : null}
      {saved ? (
        <Notice tone="success" testID="settings-saved">
          {saved}
        </Notice>
      ) : null}

      <View style={styles.actions}>
        <Button
          testID="settings-submit"
          label="Save settings"
          onPress={() => {
            clearErrors('root');
            void submit();
          }}
          busy={update.isPending}
        />
      </View>
    </View>
  );
}

/** Server field errors ("severityDueDays.critical", "settings.min_drain_slope.value") at their fields; the rest above. */
function showSettingsErrors(err: unknown, setError: UseFormSetError<SettingsFormValues>) {
  if (!(err instanceof ApiError)) {
    setError('root', { message: 'That did not save. Try again.' });
    return;
  }
  const known = new Set(['codeEditions', 'severityDueDays', 'recurringThresholds', 'settings']);
  let placed = false;
  for (const [field, message] of Object.entries(err.fields)) {
    const top = field.split('.')[0]!;
    if (!known.has(top)) continue;
    setError(field as FieldPath<SettingsFormValues>, { message });
    placed = true;
  }
  if (err.status === 403) setError('root', { message: 'Only a GC manager of this job changes its settings.' });
  else setError('root', { message: placed && err.status === 400 ? 'Check the fields marked above.' : err.message });
}

// ---------------------------------------------------------------------------------------------
// Reading (everyone else)
// ---------------------------------------------------------------------------------------------

function ValueRow({ label, value, words, testID }: { label: string; value: string; words?: string; testID: string }) {
  return (
    <View style={styles.valueRow} testID={testID}>
      <AppText variant="small" style={styles.valueLabel}>
        {label}
      </AppText>
      <View style={styles.valueText}>
        <AppText variant="label">{value}</AppText>
        {words ? (
          <AppText variant="small" muted>
            {words}
          </AppText>
        ) : null}
      </View>
    </View>
  );
}

function SettingsReadOnly({ job }: { job: JobDetail }) {
  const d = job.severityDueDays;
  const r = job.recurringThresholds;
  const days = (n: number) => `${n} day${n === 1 ? '' : 's'}`;
  return (
    <View style={styles.body} testID="settings-read-only">
      <Notice tone="info">Only a GC manager of this job changes these settings.</Notice>
      <ClockLine job={job} editor={false} />
      <Card testID="settings-rules">
        <AppText variant="heading" role="heading" aria-level={2}>
          Rules
        </AppText>
        <ValueRow
          label="Days to fix"
          value={`Critical ${days(d.critical)} · Major ${days(d.major)} · Minor ${days(d.minor)}`}
          words="A new finding is due this many days after the day it is logged, on the job's clock."
          testID="settings-due-days-value"
        />
        <ValueRow
          label="Recurring defects"
          value={`At least ${r.minUnits} units and ${shareToPercent(r.minShare)} % of checked units`}
          words={recurringRuleWords(String(r.minUnits), shareToPercent(r.minShare))}
          testID="settings-recurring-value"
        />
      </Card>
      <Card testID="settings-editions">
        <AppText variant="heading" role="heading" aria-level={2}>
          Code editions
        </AppText>
        {CODE_DOCUMENTS.map((doc) => (
          <ValueRow key={doc} label={doc} value={job.codeEditions[doc]} words={CODE_DOCUMENT_WORDS[doc]} testID={`settings-edition-${doc.replace(/\s+/g, '-')}`} />
        ))}
      </Card>
      <Card testID="settings-limits">
        <AppText variant="heading" role="heading" aria-level={2}>
          Job limits
        </AppText>
        {JOB_SETTINGS.map((def) => {
          const v = job.settings[def.key];
          return (
            <ValueRow
              key={def.key}
              label={def.label.replace(' (job setting)', '')}
              value={v ? v.text : 'Not set: the code or model value applies.'}
              words={v ? `Source: ${v.source}` : undefined}
              testID={`settings-limit-${def.key}`}
            />
          );
        })}
      </Card>
    </View>
  );
}

const styles = StyleSheet.create({
  body: { gap: space.lg },
  row: { flexDirection: 'row', flexWrap: 'wrap', columnGap: space.lg },
  third: { flexBasis: 260, flexGrow: 1, minWidth: 0 },
  cell: { flex: 1, minWidth: 0 },
  days: { flexDirection: 'row', flexWrap: 'wrap', columnGap: space.md },
  day: { flexBasis: 100, flexGrow: 1, maxWidth: 260, minWidth: 0 },
  limit: { borderTopWidth: 1, borderTopColor: colors.line, paddingTop: space.sm },
  divider: { height: 1, backgroundColor: colors.line, marginVertical: space.sm },
  error: { color: colors.danger, marginTop: -space.sm },
  link: { alignSelf: 'flex-start', paddingVertical: space.xs },
  actions: { flexDirection: 'row', gap: space.md },
  valueRow: { flexDirection: 'row', flexWrap: 'wrap', gap: space.md, paddingVertical: space.sm, borderTopWidth: 1, borderTopColor: colors.line },
  valueLabel: { flexBasis: 180, flexGrow: 1, flexShrink: 1 },
  valueText: { flexBasis: 260, flexGrow: 2, flexShrink: 1, gap: 2 },
});
