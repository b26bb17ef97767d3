import { zodResolver } from '@hookform/resolvers/zod';
import { useEffect, useMemo, useRef, useState } from 'react';
import { useForm } from 'react-hook-form';
import { StyleSheet, View } from 'react-native';
import type { z } from 'zod';
import type { RuleResult } from '../../shared/calc/rules';
import type { MeasuredRule, UnitSystem } from '../../shared/catalogue/types';
import { MAX_PHOTOS_PER_REQUEST } from '../../shared/rules/photos';
import { noLimits, sameLimitResolver } from '../../shared/rules/remeasure';
import { REASON_LIMIT, reinspectionSchema, type FindingDetail, type ReinspectionInput, type ReinspectionVerdict } from '../../shared/schemas/findings';
import { PHOTO_STAGE_LABELS } from '../../shared/words';
import { writeErrorMessage } from '../api/writeErrors';
import type { PickedPhoto } from '../findings/PhotoPicker.types';
import { isQueued, keepNow, labelWrite } from '../outbox';
import { reinspectionWrite, useFindingWriteMutation } from '../queries/correction';
import { space } from '../theme';
import { AppText } from '../ui/AppText';
import { Button } from '../ui/Button';
import { FormBanner } from '../ui/FormBanner';
import { FormMeasured, FormPhotos, FormText, setServerFieldErrors, withFormOnly } from '../ui/FormFields';
import { ActionWrite, FINDING_WRITE_WORDS, isStale } from './rules';

type ReinspectValues = ReinspectionInput & { photos: PickedPhoto[] };
type ReinspectParsed = z.output<typeof reinspectionSchema> & { photos: PickedPhoto[] };

// Photos are the inspector's own and optional; the field itself refuses more than the request takes.
const resolver = withFormOnly<ReinspectionInput, unknown, z.output<typeof reinspectionSchema>, { photos: PickedPhoto[] }>(zodResolver(reinspectionSchema), {
  photos: () => undefined,
});

/**
 * The inspector's verdict on a fix in one tap: Accept, or Return with the reason typed above it;
 * with their own photos beside the fix and, for a measured defect, their own new measurement
 * (judged against the finding's own limit as it is typed). Sent with If-Match (the version looked
 * at): a finding changed meanwhile is refused and reloaded. Accepting while the new measurement
 * fails is refused by the server with the reason, which shows above the buttons.
 */
export function ReinspectControls({
  jobId,
  finding,
  measured,
  onStale,
  onDone,
  testID = 'reinspect',
}: {
  jobId: string;
  finding: { id: string; version: number; label: string };
  /** The defect type's measured rule and the finding's own result: the inspector may measure again. */
  measured?: { rule: MeasuredRule; original: RuleResult | null; system: UnitSystem } | null;
  onStale: () => void;
  /** After the verdict is saved: the finding as the server holds it now (null: kept on this phone, waiting to send). */
  onDone?: (verdict: ReinspectionVerdict, finding: FindingDetail | null) => void;
  testID?: string;
}) {
  const write = useFindingWriteMutation(jobId);
  const [slot] = useState(() => new ActionWrite());
  const [pending, setPending] = useState<ReinspectionVerdict | null>(null);
  const { control, handleSubmit, setValue, getValues, setError, reset, watch } = useForm<ReinspectValues, unknown, ReinspectParsed>({
    resolver,
    defaultValues: { verdict: 'accept', reason: '', measuredText: null, photos: [] },
  });
  const resolve = useMemo(() => (measured ? sameLimitResolver(measured.rule, measured.original, noLimits) : noLimits), [measured]);
  // Another verdict, reason, measurement or photo is other content: the next press makes a new write.
  useEffect(() => {
    const sub = watch(() => slot.settled());
    return () => sub.unsubscribe();
  }, [watch, slot]);

  // A verdict being kept and sent: another press meanwhile (either button, before they are
  // disabled) keeps and sends nothing more.
  const pressed = useRef(false);
  function send(verdict: ReinspectionVerdict) {
    if (pressed.current) return;
    if (getValues('verdict') !== verdict) setValue('verdict', verdict);
    void handleSubmit(async ({ reason, measuredText, photos }) => {
      if (pressed.current) return;
      pressed.current = true;
      const input: ReinspectionInput = { verdict, reason: reason || undefined, ...(measuredText ? { measuredText } : {}) };
      const w = slot.take(() => labelWrite(reinspectionWrite(jobId, finding.id, finding.version, input, photos), finding.label));
      // Kept on the phone first (handed to IndexedDB in this turn), then the buttons show it.
      const kept = keepNow(w);
      setPending(verdict);
      await kept;
      write.mutate(w, {
        onSuccess: (res) => {
          slot.settled();
          reset({ verdict, reason: '', measuredText: null, photos: [] });
          onDone?.(verdict, isQueued(res) ? null : res);
        },
        onError: (err) => {
          slot.settled(err);
          setServerFieldErrors(err, setError, ['reason', 'measuredText', 'photos']);
          setError('root', { message: writeErrorMessage(err, FINDING_WRITE_WORDS) });
          if (isStale(err)) onStale();
        },
        onSettled: () => {
          pressed.current = false;
          setPending(null);
        },
      });
    })();
  }

  return (
    <View style={styles.wrap} testID={testID}>
      {measured ? (
        <View style={styles.wrap}>
          <AppText variant="label">New measurement at re-inspection (optional)</AppText>
          <FormMeasured control={control} name="measuredText" testID={`${testID}-measured`} rule={measured.rule} resolve={resolve} system={measured.system} />
        </View>
      ) : null}
      <FormPhotos
        control={control}
        name="photos"
        label={`Your photos of ${finding.label} (optional)`}
        photoLabel={PHOTO_STAGE_LABELS.reinspection}
        testID={testID}
        max={MAX_PHOTOS_PER_REQUEST}
        tooMany={`At most ${MAX_PHOTOS_PER_REQUEST} photos with a re-inspection.`}
      />
      <FormText
        control={control}
        name="reason"
        label={`Reason (needed to return ${finding.label})`}
        limit={REASON_LIMIT}
        placeholder="e.g. Drain still falls back toward the unit."
        testID={`${testID}-reason`}
        compact
      />
      <FormBanner control={control} testID={`${testID}-error`} />
      <View style={styles.row}>
        <Button
          label="✓ Accept fix"
          accessibilityLabel={`Accept fix — ${finding.label}`}
          testID={`${testID}-accept`}
          busy={pending === 'accept'}
          disabled={pending !== null}
          onPress={() => send('accept')}
          style={styles.grow}
        />
        <Button
          label="↩ Return"
          accessibilityLabel={`Return fix — ${finding.label}`}
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
