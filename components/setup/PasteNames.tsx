/**
 * Several levels or spaces at once: names pasted one per line (from a drawing list or a room
 * schedule), checked with the bulk schema's words, sent as one all-or-nothing write.
 */
import { zodResolver } from '@hookform/resolvers/zod';
import { useMemo, useState } from 'react';
import { useForm } from 'react-hook-form';
import { StyleSheet, View } from 'react-native';
import { pastedLines, pastedNamesForm } from '../../shared/schemas/setup';
import { writeErrorMessage } from '../api/writeErrors';
import { space } from '../theme';
import { AppText } from '../ui/AppText';
import { Button } from '../ui/Button';
import { Card } from '../ui/Card';
import { FormBanner } from '../ui/FormBanner';
import { FormText } from '../ui/FormFields';
import { Notice } from '../ui/Notice';

export function PasteNames({
  title,
  subject,
  max,
  noun,
  placeholder,
  testID,
  before,
  send,
}: {
  title: string;
  /** "a level name": the schema's words */
  subject: string;
  max: number;
  /** ["level", "levels"] */
  noun: [string, string];
  placeholder: string;
  testID: string;
  /** Fields above the box (the level the spaces go on). */
  before?: React.ReactNode;
  send: (names: string[]) => Promise<unknown>;
}) {
  const schema = useMemo(() => pastedNamesForm(subject, max), [subject, max]);
  const { control, handleSubmit, reset, watch } = useForm({ resolver: zodResolver(schema), defaultValues: { text: '' } });
  const [result, setResult] = useState<{ tone: 'success' | 'error'; text: string } | null>(null);
  const [busy, setBusy] = useState(false);
  const count = pastedLines(watch('text')).length;
  const words = (n: number) => `${n} ${n === 1 ? noun[0] : noun[1]}`;
  const submit = handleSubmit(async ({ text }) => {
    setResult(null);
    setBusy(true);
    try {
      const names = pastedLines(text);
      await send(names);
      reset({ text: '' });
      setResult({ tone: 'success', text: `${words(names.length)} added.` });
    } catch (err) {
      setResult({ tone: 'error', text: writeErrorMessage(err) });
    } finally {
      setBusy(false);
    }
  });
  return (
    <Card testID={testID}>
      <AppText variant="heading">{title}</AppText>
      <AppText variant="small" muted>
        One per line; empty lines are skipped. Either all are added or none.
      </AppText>
      {before}
      <FormBanner control={control} testID={`${testID}-error`} />
      {result ? (
        <Notice tone={result.tone} testID={`${testID}-result`}>
          {result.text}
        </Notice>
      ) : null}
      <FormText control={control} name="text" label="Names, one per line" testID={`${testID}-input`} multiline placeholder={placeholder} style={styles.box} />
      <View style={styles.row}>
        <Button testID={`${testID}-submit`} label={count > 0 ? `Add ${words(count)}` : `Add ${noun[1]}`} disabled={count === 0} busy={busy} onPress={submit} />
      </View>
    </Card>
  );
}

const styles = StyleSheet.create({
  box: { minHeight: 120, paddingTop: space.sm, textAlignVertical: 'top' },
  row: { flexDirection: 'row', flexWrap: 'wrap', gap: space.md },
});
