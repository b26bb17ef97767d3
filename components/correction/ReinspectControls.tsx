import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { REASON_MAX, reinspectionSchema, type ReinspectionVerdict } from '../../shared/schemas/findings';
import { reinspectionWrite, useFindingWriteMutation } from '../queries/correction';
import { space } from '../theme';
import { Button } from '../ui/Button';
import { Notice } from '../ui/Notice';
import { TextField } from '../ui/TextField';
import { ActionWrite, isStale, writeErrorMessage } from './rules';

/**
 * The inspector's verdict on a fix in one tap: Accept, or Return with the reason typed above it.
 * Sent with If-Match (the version looked at): a finding changed meanwhile is refused and reloaded.
 */
export function ReinspectControls({
  jobId,
  finding,
  onStale,
  onDone,
  testID = 'reinspect',
}: {
  jobId: string;
  finding: { id: string; version: number; label: string };
  onStale: () => void;
  onDone?: (verdict: ReinspectionVerdict) => void;
  testID?: string;
}) {
  const write = useFindingWriteMutation(jobId);
  const [slot] = useState(() => new ActionWrite());
  const [reason, setReason] = useState('');
  const [reasonError, setReasonError] = useState<string | undefined>();
  const [error, setError] = useState<string | null>(null);
  const [pending, setPending] = useState<ReinspectionVerdict | null>(null);

  function send(verdict: ReinspectionVerdict) {
    setError(null);
    const parsed = reinspectionSchema.safeParse({ verdict, reason: reason.trim() || undefined });
    if (!parsed.success) {
      setReasonError(parsed.error.issues[0]?.message ?? 'Say why the fix is returned.');
      return;
    }
    setReasonError(undefined);
    setPending(verdict);
    const w = slot.take(() => reinspectionWrite(jobId, finding.id, finding.version, parsed.data));
    write.mutate(w, {
      onSuccess: () => {
        slot.settled();
        setReason('');
        onDone?.(verdict);
      },
      onError: (err) => {
        slot.settled(err);
        setError(writeErrorMessage(err));
        if (isStale(err)) onStale();
      },
      onSettled: () => setPending(null),
    });
  }

  return (
    <View style={styles.wrap} testID={testID}>
      <TextField
        label={`Reason (needed to return ${finding.label})`}
        value={reason}
        onChangeText={(t) => {
          slot.settled();
          setReason(t);
          setReasonError(undefined);
        }}
        maxLength={REASON_MAX}
        placeholder="e.g. Drain still falls back toward the unit."
        error={reasonError}
        testID={`${testID}-reason`}
        compact
      />
      {error ? (
        <Notice tone="error" testID={`${testID}-error`}>
          {error}
        </Notice>
      ) : null}
      <View style={styles.row}>
        <Button
          label="✓ Accept fix"
          testID={`${testID}-accept`}
          busy={pending === 'accept'}
          disabled={pending !== null}
          onPress={() => send('accept')}
          style={styles.grow}
        />
        <Button
          label="↩ Return"
          tone="danger"
          testID={`${testID}-return`}
          busy={pending === 'return'}
          disabled={pending !== null}
          onPress={() => send('return')}
          style={styles.grow}
        />
      </View>
    </View>
  );
}

const styles = StyleSheet.create({
  wrap: { gap: space.sm },
  row: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm },
  grow: { flexGrow: 1, flexBasis: 140 },
});
