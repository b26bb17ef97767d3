import { zodResolver } from '@hookform/resolvers/zod';
import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { StyleSheet, View } from 'react-native';
import type { ExcludedCeilingUnit } from '../../shared/schemas/board';
import { textLimit } from '../../shared/schemas/fields';
import { CEILING_EXCLUSION_REASON_MAX, ceilingExclusionSchema } from '../../shared/schemas/setup';
import { writeErrorMessage } from '../api/writeErrors';
import { formatWhen } from '../findings/due';
import { ceilingExclusionWrite, liftCeilingExclusionWrite, useCeilingExclusionMutation } from '../queries/board';
import { colors, radius, space } from '../theme';
import { AppText } from '../ui/AppText';
import { Button } from '../ui/Button';
import { FormBanner } from '../ui/FormBanner';
import { FormText, setServerFieldErrors } from '../ui/FormFields';

const REASON_LIMIT = textLimit(CEILING_EXCLUSION_REASON_MAX, 'The reason');

/**
 * A unit in or above the ceiling without a complete unit check. A GC manager may exclude it from
 * the ceiling rule, always with a reason (PUT /units/:unitId/ceiling-exclusion); others see the tag.
 */
export function UncheckedCeilingUnit({ jobId, unit, canExclude }: { jobId: string; unit: { unitId: string; tag: string; version: number }; canExclude: boolean }) {
  const [open, setOpen] = useState(false);
  const exclude = useCeilingExclusionMutation(jobId);
  const { control, handleSubmit, setError, reset } = useForm({ resolver: zodResolver(ceilingExclusionSchema), defaultValues: { reason: '' } });
  const send = handleSubmit((values) => {
    exclude.mutate(ceilingExclusionWrite(jobId, unit.unitId, unit.version, values), {
      onSuccess: () => {
        reset({ reason: '' });
        setOpen(false);
      },
      onError: (e) => {
        setServerFieldErrors(e, setError, ['reason']);
        setError('root', { message: writeErrorMessage(e) });
      },
    });
  });
  return (
    <View style={styles.row} testID={`ceiling-unchecked-${unit.tag}`}>
      <View style={styles.line}>
        <AppText variant="label">{unit.tag}</AppText>
        {canExclude && !open ? (
          <Button label="Exclude from the ceiling rule" tone="quiet" onPress={() => setOpen(true)} testID={`ceiling-exclude-${unit.tag}`} />
        ) : null}
      </View>
      {open ? (
        <View style={styles.form}>
          <FormText
            control={control}
            name="reason"
            label={`Why ${unit.tag} need not be checked before the ceiling closes`}
            multiline
            style={multilineStyle}
            limit={REASON_LIMIT}
            testID={`ceiling-exclude-reason-${unit.tag}`}
            compact
          />
          <FormBanner control={control} testID={`ceiling-exclude-error-${unit.tag}`} />
          <View style={styles.line}>
            <Button label="Exclude" tone="secondary" busy={exclude.isPending} onPress={send} testID={`ceiling-exclude-send-${unit.tag}`} />
            <Button label="Cancel" tone="quiet" onPress={() => setOpen(false)} testID={`ceiling-exclude-cancel-${unit.tag}`} />
          </View>
        </View>
      ) : null}
    </View>
  );
}

/** A unit a GC manager excluded from the ceiling rule: why, who and when; a GC manager may count it again. */
export function ExcludedCeilingUnitRow({ jobId, unit, timeZone, canExclude }: { jobId: string; unit: ExcludedCeilingUnit; timeZone: string; canExclude: boolean }) {
  const lift = useCeilingExclusionMutation(jobId);
  const [error, setErrorText] = useState<string | null>(null);
  return (
    <View style={styles.excluded} testID={`ceiling-excluded-${unit.tag}`}>
      <AppText variant="label">{unit.tag}</AppText>
      <AppText>{unit.reason}</AppText>
      <AppText variant="small" muted>
        Excluded by {unit.by.name} · {formatWhen(unit.at, timeZone)}
      </AppText>
      {canExclude ? (
        <Button
          label="Count it again"
          tone="quiet"
          busy={lift.isPending}
          onPress={() => {
            setErrorText(null);
            lift.mutate(liftCeilingExclusionWrite(jobId, unit.unitId, unit.version), { onError: (e) => setErrorText(writeErrorMessage(e)) });
          }}
          testID={`ceiling-count-again-${unit.tag}`}
        />
      ) : null}
      {error ? (
        <AppText variant="small" style={styles.error} testID={`ceiling-count-again-error-${unit.tag}`}>
          {error}
        </AppText>
      ) : null}
    </View>
  );
}

/** Room for a few lines, text from the top. */
const multilineStyle = { minHeight: 80, paddingVertical: 10, textAlignVertical: 'top' as const };

const styles = StyleSheet.create({
  row: { gap: space.xs },
  line: { flexDirection: 'row', alignItems: 'center', flexWrap: 'wrap', gap: space.sm },
  form: { gap: space.sm },
  excluded: { backgroundColor: colors.paper, borderRadius: radius.sm, padding: space.sm, gap: 2, alignItems: 'flex-start' },
  error: { color: colors.danger },
});
