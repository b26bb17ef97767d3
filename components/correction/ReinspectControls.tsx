import { zodResolver } from '@hookform/resolvers/zod';
import { useEffect, useState } from 'react';
import { useForm } from 'react-hook-form';
import { StyleSheet, View } from 'react-native';
import { REASON_MAX, reinspectionSchema, type ReinspectionVerdict } from '../../shared/schemas/findings';
import { writeErrorMessage } from '../api/writeErrors';
import { reinspectionWrite, useFindingWriteMutation } from '../queries/correction';
import { space } from '../theme';
import { Button } from '../ui/Button';
import { FormText, setServerFieldErrors } from '../ui/FormFields';
import { Notice } from '../ui/Notice';
import { ActionWrite, FINDING_WRITE_WORDS, isStale } from './rules';

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
  const [pending, setPending] = useState<ReinspectionVerdict | null>(null);
  const { control, handleSubmit, setValue, getValues, setError, reset, watch, formState } = useForm({
    resolver: zodResolver(reinspectionSchema),
    defaultValues: { verdict: 'accept' as ReinspectionVerdict, reason: '' },
  });
  // Another verdict or reason is other content: the next press makes a new write.
  useEffect(() => {
    const sub = watch(() => slot.settled());
    return () => sub.unsubscribe();
  }, [watch, slot]);

  function send(verdict: ReinspectionVerdict) {
    if (getValues('verdict') !== verdict) setValue('verdict', verdict);
    void handleSubmit(({ reason }) => {
      setPending(verdict);
      const w = slot.take(() => reinspectionWrite(jobId, finding.id, finding.version, { verdict, reason: reason || undefined }));
      write.mutate(w, {
        onSuccess: () => {
          slot.settled();
          reset({ verdict, reason: '' });
          onDone?.(verdict);
        },
        onError: (err) => {
          slot.settled(err);
          setServerFieldErrors(err, setError, ['reason']);
          setError('root', { message: writeErrorMessage(err, FINDING_WRITE_WORDS) });
          if (isStale(err)) onStale();
        },
        onSettled: () => setPending(null),
      });
    })();
  }
  const error = formState.errors.root?.message;

  return (
    <View style={styles.wrap} testID={testID}>
      <FormText
        control={control}
        name="reason"
        label={`Reason (needed to return ${finding.label})`}
        maxLength={REASON_MAX}
        placeholder="e.g. Drain still falls back toward the unit."
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
