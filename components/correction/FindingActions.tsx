import type { UnitSystem } from '../../shared/catalogue/types';
import { zodResolver } from '@hookform/resolvers/zod';
import { useEffect, useRef, useState } from 'react';
import { useForm } from 'react-hook-form';
import { StyleSheet, View } from 'react-native';
import {
  NOTE_LIMIT,
  REASON_LIMIT,
  findingChangeSchema,
  type FindingAction,
  type FindingChangeInput,
  type FindingChangeParsed,
  type FindingDetail,
} from '../../shared/schemas/findings';
import { SEVERITY_LABELS, type Role, type Severity } from '../../shared/words';
import { writeErrorMessage } from '../api/writeErrors';
import { isQueued } from '../outbox';
import { findingChangeWrite, useFindingWriteMutation } from '../queries/correction';
import { useJobCompaniesQuery } from '../queries/companies';
import { space } from '../theme';
import { AppText } from '../ui/AppText';
import { Button } from '../ui/Button';
import { Card } from '../ui/Card';
import { FormBanner } from '../ui/FormBanner';
import { FormSelect, FormSeverity, FormText, setServerFieldErrors } from '../ui/FormFields';
import { Notice } from '../ui/Notice';
import { Segmented } from '../ui/Segmented';
import { dueOnProblem } from '../../shared/rules/pastDue';
import { BackdateChoice, backdatedFlag } from '../findings/BackdateChoice';
import { todayIn } from '../findings/due';
import { ReinspectControls } from './ReinspectControls';
import { FINDING_WRITE_WORDS, isStale, mayDo } from './rules';

type Change = 'reassign' | 'severity' | 'due' | 'void' | 'reopen';
const CHANGES: { key: Change; action: FindingAction; label: string }[] = [
  { key: 'reassign', action: 'reassign', label: 'Reassign' },
  { key: 'severity', action: 'change_severity', label: 'Severity' },
  { key: 'due', action: 'change_due', label: 'Due date' },
  { key: 'void', action: 'void', label: 'Void' },
  { key: 'reopen', action: 'reopen', label: 'Reopen' },
];

/**
 * What an inspector or GC manager may do to a finding now, and nothing else: re-inspect a fix,
 * close it on a walk, and the changes (reassign, severity, due date, void, reopen). Each change
 * is sent with If-Match; "someone changed this" reloads the finding and says so.
 */
export function FindingActions({
  jobId,
  finding,
  role,
  isLogger,
  system,
  timeZone = 'UTC',
  onStale,
}: {
  jobId: string;
  finding: FindingDetail;
  role: Role;
  isLogger: boolean;
  /** The job's unit system, for a new measurement at re-inspection. */
  system?: UnitSystem;
  /** The job's time zone: "today" for a new due date. */
  timeZone?: string;
  onStale: () => void;
}) {
  const can = (a: FindingAction) => mayDo(a, finding.status, role, isLogger);
  const changes = CHANGES.filter((c) => can(c.action));
  const reinspect = can('accept') || can('return');
  const close = can('close');
  if (!reinspect && !close && changes.length === 0) return null;
  return (
    <View style={styles.stack} testID="finding-actions">
      {reinspect ? (
        <Card testID="finding-reinspect">
          <AppText variant="title" role="heading">
            Re-inspect the fix
          </AppText>
          <AppText variant="small" muted>
            Compare the fix photos with the finding’s photos, then accept it, or return it with the reason.
          </AppText>
          <ReinspectControls
            jobId={jobId}
            finding={finding}
            measured={finding.catalogue.rule && system ? { rule: finding.catalogue.rule, original: finding.ruleResult, system } : null}
            onStale={onStale}
          />
        </Card>
      ) : null}
      {close ? <CloseOnWalk jobId={jobId} finding={finding} onStale={onStale} /> : null}
      {changes.length ? <ChangePanel jobId={jobId} finding={finding} changes={changes} role={role} timeZone={timeZone} onStale={onStale} /> : null}
    </View>
  );
}

function CloseOnWalk({ jobId, finding, onStale }: { jobId: string; finding: FindingDetail; onStale: () => void }) {
  const write = useFindingWriteMutation(jobId);
  const { control, handleSubmit, setError, reset } = useForm<FindingChangeInput, unknown, FindingChangeParsed>({
    resolver: zodResolver(findingChangeSchema),
    defaultValues: { close: { note: '' } },
  });
  const send = handleSubmit((values) => {
    const body: FindingChangeInput = { close: { note: values.close?.note || undefined } };
    write.mutate(findingChangeWrite(jobId, finding.id, finding.version, body), {
      onSuccess: () => reset({ close: { note: '' } }),
      onError: (err) => {
        setServerFieldErrors(err, setError, ['close.note']);
        setError('root', { message: writeErrorMessage(err, FINDING_WRITE_WORDS) });
        if (isStale(err)) onStale();
      },
    });
  });
  return (
    <Card testID="finding-close">
      <AppText variant="heading">Found fixed on this walk?</AppText>
      <FormText control={control} name="close.note" label="Note (optional)" limit={NOTE_LIMIT} testID="finding-close-note" compact />
      <FormBanner control={control} testID="finding-close-error" />
      <Button label="Close (fixed on walk)" tone="secondary" busy={write.isPending} onPress={send} testID="finding-close-submit" />
    </Card>
  );
}

/** What was typed for each kind of change, kept while switching between them. */
interface Typed {
  companyId?: string;
  severity: Severity;
  dueOn: string;
  reason: string;
}

/** The PATCH body for one kind of change, filled with what was typed. */
function changeFor(kind: Change, t: Typed): FindingChangeInput {
  switch (kind) {
    case 'reassign':
      return { reassign: { companyId: t.companyId as string, reason: t.reason } };
    case 'severity':
      return { severity: { to: t.severity, reason: t.reason } };
    case 'due':
      return { dueOn: { to: t.dueOn, reason: t.reason } };
    case 'void':
      return { void: { reason: t.reason } };
    case 'reopen':
      return { reopen: { reason: t.reason } };
  }
}

/** Where each kind of change sits in the PATCH body (its fields are named under it). */
const BODY_KEY = { reassign: 'reassign', severity: 'severity', due: 'dueOn', void: 'void', reopen: 'reopen' } as const;

function typedFrom(values: FindingChangeInput, before: Typed): Typed {
  return {
    companyId: values.reassign ? values.reassign.companyId : before.companyId,
    severity: values.severity?.to ?? before.severity,
    dueOn: values.dueOn?.to ?? before.dueOn,
    reason: values.reassign?.reason ?? values.severity?.reason ?? values.dueOn?.reason ?? values.void?.reason ?? values.reopen?.reason ?? before.reason,
  };
}

function ChangePanel({
  jobId,
  finding,
  changes,
  role,
  timeZone,
  onStale,
}: {
  jobId: string;
  finding: FindingDetail;
  changes: readonly { key: Change; label: string }[];
  role: Role;
  timeZone: string;
  onStale: () => void;
}) {
  const write = useFindingWriteMutation(jobId);
  const companies = useJobCompaniesQuery(jobId);
  const [which, setWhich] = useState<Change>(changes[0]!.key);
  const current = changes.some((c) => c.key === which) ? which : changes[0]!.key;
  const [saved, setSaved] = useState<string | null>(null);
  // A GC manager's explicit "back-date on purpose" for a due date before today.
  const [backdate, setBackdate] = useState(false);
  const today = todayIn(timeZone);
  const typed = useRef<Typed>({ companyId: undefined, severity: finding.severity, dueOn: finding.dueOn, reason: '' });
  const { control, handleSubmit, setError, reset, getValues, watch } = useForm<FindingChangeInput, unknown, FindingChangeParsed>({
    resolver: zodResolver(findingChangeSchema),
    defaultValues: changeFor(current, typed.current),
  });
  const dueTyped = watch('dueOn.to');
  // The form holds the body of the change shown; a finding whose status no longer allows the
  // chosen change shows the first one it allows.
  const key = BODY_KEY[current];
  useEffect(() => {
    if (getValues(key) === undefined) reset(changeFor(current, typedFrom(getValues(), typed.current)));
  }, [key, current, getValues, reset]);

  function choose(next: Change) {
    typed.current = typedFrom(getValues(), typed.current);
    setWhich(next);
    setSaved(null);
    reset(changeFor(next, typed.current));
  }

  const send = handleSubmit((values) => {
    setSaved(null);
    const t = typedFrom(values, typed.current);
    const r = t.reason;
    const input: FindingChangeInput =
      current === 'severity'
        ? { severity: { to: t.severity, reason: r || undefined } }
        : current === 'due'
          ? { dueOn: { to: t.dueOn, reason: r || undefined, ...backdatedFlag(backdate, t.dueOn, today) } }
          : changeFor(current, t);
    if (current === 'due') {
      // The server refuses a date before today on the job's clock; say so at the field first.
      const problem = dueOnProblem({ dueOn: t.dueOn, backdated: backdate, role, today });
      if (problem) {
        setError('dueOn.to', { type: 'validate', message: problem.message });
        setError('root', { message: 'Check the due date.' });
        return;
      }
    }
    write.mutate(findingChangeWrite(jobId, finding.id, finding.version, input), {
      onSuccess: (res) => {
        typed.current = { ...t, reason: '' };
        reset(changeFor(current, typed.current));
        // No signal: kept on the phone, and said so (it is not on the server yet).
        if (isQueued(res)) setSaved('Saved on this phone, waiting to send.');
        else setSaved(current === 'void' ? 'Voided.' : current === 'reopen' ? 'Reopened.' : 'Saved.');
      },
      onError: (err) => {
        setServerFieldErrors(err, setError, [`${key}.reason`, 'reassign.companyId', 'severity.to', 'dueOn.to']);
        setError('root', { message: writeErrorMessage(err, FINDING_WRITE_WORDS) });
        if (isStale(err)) onStale();
      },
    });
  });

  const reasonRequired = current === 'reassign' || current === 'void' || current === 'reopen';
  const others = (companies.data ?? []).filter((c) => c.id !== finding.companyId);
  return (
    <Card testID="finding-change">
      <AppText variant="title" role="heading">
        Change this finding
      </AppText>
      <Segmented
        label="What to change"
        value={current}
        options={changes.map((c) => ({ value: c.key, label: c.label }))}
        onChange={choose}
        testID="finding-change-kind"
      />
      {current === 'reassign' ? (
        <FormSelect
          control={control}
          name="reassign.companyId"
          label={`Responsible company (now ${finding.companyName})`}
          placeholder={companies.isPending ? 'Loading the companies…' : 'Choose a company'}
          options={others.map((c) => ({ value: c.id, label: c.name }))}
          testID="finding-change-company"
        />
      ) : current === 'severity' ? (
        <View>
          <AppText variant="small" muted>
            Now {SEVERITY_LABELS[finding.severity]}.
          </AppText>
          <FormSeverity control={control} name="severity.to" testID="finding-change-severity" />
        </View>
      ) : current === 'due' ? (
        <View>
          <FormText control={control} name="dueOn.to" label="Due on (YYYY-MM-DD)" testID="finding-change-due" autoCapitalize="none" compact />
          <BackdateChoice dueOn={dueTyped} today={today} role={role} value={backdate} onChange={setBackdate} testID="finding-change-backdate" />
        </View>
      ) : null}
      <FormText
        key={key}
        control={control}
        name={`${key}.reason`}
        label={reasonRequired ? 'Reason' : 'Reason (optional)'}
        limit={REASON_LIMIT}
        testID="finding-change-reason"
        compact
      />
      <FormBanner control={control} testID="finding-change-error" />
      {saved ? (
        <Notice tone="success" testID="finding-change-saved">
          {saved}
        </Notice>
      ) : null}
      <Button
        label={current === 'void' ? 'Void finding' : current === 'reopen' ? 'Reopen finding' : 'Save change'}
        tone={current === 'void' ? 'danger' : 'primary'}
        busy={write.isPending}
        onPress={send}
        testID="finding-change-submit"
      />
    </Card>
  );
}

const styles = StyleSheet.create({
  stack: { gap: space.lg },
});
