import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import {
  NOTE_MAX,
  REASON_MAX,
  findingChangeSchema,
  type FindingAction,
  type FindingChangeInput,
  type FindingDetail,
} from '../../shared/schemas/findings';
import { ApiError } from '../api/client';
import { SEVERITY_LABELS, type Role, type Severity } from '../../shared/words';
import { SeverityPicker } from '../findings/SeverityPicker';
import { findingChangeWrite, useFindingWriteMutation } from '../queries/correction';
import { useJobCompaniesQuery } from '../queries/companies';
import { space } from '../theme';
import { AppText } from '../ui/AppText';
import { Button } from '../ui/Button';
import { Card } from '../ui/Card';
import { Notice } from '../ui/Notice';
import { Segmented } from '../ui/Segmented';
import { Select } from '../ui/Select';
import { TextField } from '../ui/TextField';
import { ReinspectControls } from './ReinspectControls';
import { isStale, mayDo, writeErrorMessage } from './rules';

type Change = 'reassign' | 'severity' | 'due' | 'void' | 'reopen';
const CHANGES: { key: Change; action: FindingAction; label: string }[] = [
  { key: 'reassign', action: 'reassign', label: 'Reassign' },
  { key: 'severity', action: 'change_severity', label: 'Severity' },
  { key: 'due', action: 'change_due', label: 'Due date' },
  { key: 'void', action: 'void', label: 'Void' },
  { key: 'reopen', action: 'reopen', label: 'Reopen' },
];

/** The first message of a failed parse, by field (the PATCH body nests it: reassign.companyId → companyId). */
function firstErrors(issues: readonly { path: readonly PropertyKey[]; message: string }[]): Record<string, string> {
  const out: Record<string, string> = {};
  for (const i of issues) {
    const key = String(i.path[i.path.length - 1] ?? 'form');
    if (!out[key]) out[key] = i.message;
  }
  return out;
}

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
  onStale,
}: {
  jobId: string;
  finding: FindingDetail;
  role: Role;
  isLogger: boolean;
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
          <ReinspectControls jobId={jobId} finding={finding} onStale={onStale} />
        </Card>
      ) : null}
      {close ? <CloseOnWalk jobId={jobId} finding={finding} onStale={onStale} /> : null}
      {changes.length ? <ChangePanel jobId={jobId} finding={finding} changes={changes} onStale={onStale} /> : null}
    </View>
  );
}

function CloseOnWalk({ jobId, finding, onStale }: { jobId: string; finding: FindingDetail; onStale: () => void }) {
  const write = useFindingWriteMutation(jobId);
  const [note, setNote] = useState('');
  const [error, setError] = useState<string | null>(null);
  function send() {
    setError(null);
    const body: FindingChangeInput = { close: { note: note.trim() || undefined } };
    write.mutate(findingChangeWrite(jobId, finding.id, finding.version, body), {
      onSuccess: () => setNote(''),
      onError: (err) => {
        setError(writeErrorMessage(err));
        if (isStale(err)) onStale();
      },
    });
  }
  return (
    <Card testID="finding-close">
      <AppText variant="heading">Found fixed on this walk?</AppText>
      <TextField label="Note (optional)" value={note} onChangeText={setNote} maxLength={NOTE_MAX} testID="finding-close-note" compact />
      {error ? (
        <Notice tone="error" testID="finding-close-error">
          {error}
        </Notice>
      ) : null}
      <Button label="Close (fixed on walk)" tone="secondary" busy={write.isPending} onPress={send} testID="finding-close-submit" />
    </Card>
  );
}

function ChangePanel({
  jobId,
  finding,
  changes,
  onStale,
}: {
  jobId: string;
  finding: FindingDetail;
  changes: readonly { key: Change; label: string }[];
  onStale: () => void;
}) {
  const write = useFindingWriteMutation(jobId);
  const companies = useJobCompaniesQuery(jobId);
  const [which, setWhich] = useState<Change>(changes[0]!.key);
  const current = changes.some((c) => c.key === which) ? which : changes[0]!.key;
  const [companyId, setCompanyId] = useState('');
  const [severity, setSeverity] = useState<Severity>(finding.severity);
  const [dueOn, setDueOn] = useState(finding.dueOn);
  const [reason, setReason] = useState('');
  const [errors, setErrors] = useState<Record<string, string>>({});
  const [saved, setSaved] = useState<string | null>(null);

  function body(): FindingChangeInput {
    const r = reason.trim();
    switch (current) {
      case 'reassign':
        return { reassign: { companyId, reason: r } };
      case 'severity':
        return { severity: { to: severity, reason: r || undefined } };
      case 'due':
        return { dueOn: { to: dueOn.trim(), reason: r || undefined } };
      case 'void':
        return { void: { reason: r } };
      case 'reopen':
        return { reopen: { reason: r } };
    }
  }

  function send() {
    setSaved(null);
    const input = body();
    const parsed = findingChangeSchema.safeParse(input);
    if (!parsed.success) {
      setErrors(firstErrors(parsed.error.issues));
      return;
    }
    setErrors({});
    write.mutate(findingChangeWrite(jobId, finding.id, finding.version, input), {
      onSuccess: () => {
        setReason('');
        setSaved(current === 'void' ? 'Voided.' : current === 'reopen' ? 'Reopened.' : 'Saved.');
      },
      onError: (err) => {
        setErrors({ ...(err instanceof ApiError ? err.fields : {}), form: writeErrorMessage(err) });
        if (isStale(err)) onStale();
      },
    });
  }

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
        onChange={(v) => {
          setWhich(v);
          setErrors({});
          setSaved(null);
        }}
        testID="finding-change-kind"
      />
      {current === 'reassign' ? (
        <Select
          label={`Responsible company (now ${finding.companyName})`}
          value={companyId}
          placeholder={companies.isPending ? 'Loading the companies…' : 'Choose a company'}
          options={others.map((c) => ({ value: c.id, label: c.name }))}
          onChange={setCompanyId}
          error={errors.companyId}
          testID="finding-change-company"
        />
      ) : current === 'severity' ? (
        <View>
          <AppText variant="small" muted>
            Now {SEVERITY_LABELS[finding.severity]}.
          </AppText>
          <SeverityPicker value={severity} onChange={setSeverity} testID="finding-change-severity" />
        </View>
      ) : current === 'due' ? (
        <TextField
          label="Due on (YYYY-MM-DD)"
          value={dueOn}
          onChangeText={setDueOn}
          error={errors.to}
          testID="finding-change-due"
          autoCapitalize="none"
          compact
        />
      ) : null}
      <TextField
        label={reasonRequired ? 'Reason' : 'Reason (optional)'}
        value={reason}
        onChangeText={setReason}
        maxLength={REASON_MAX}
        error={errors.reason}
        testID="finding-change-reason"
        compact
      />
      {errors.form ? (
        <Notice tone="error" testID="finding-change-error">
          {errors.form}
        </Notice>
      ) : errors.change ? (
        <Notice tone="error">{errors.change}</Notice>
      ) : null}
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
