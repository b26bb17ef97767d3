import { zodResolver } from '@hookform/resolvers/zod';
import type { z } from 'zod';
import { useEffect, useMemo, useRef, useState } from 'react';
import { useForm } from 'react-hook-form';
import type { UnitSystem } from '../../shared/catalogue/types';
import { fixNeedsMeasurement, newMeasurementNeeded, noLimits, sameLimitResolver } from '../../shared/rules/remeasure';
import { NOTE_LIMIT, submitFixSchema, type FindingDetail, type SubmitFixInput } from '../../shared/schemas/findings';
import { writeErrorMessage } from '../api/writeErrors';
import { isQueued, keepNow, labelWrite } from '../outbox';
import { MAX_PHOTOS } from '../findings/FindingForm';
import type { PickedPhoto } from '../findings/PhotoPicker.types';
import { submitFixWrite, useSubmitFixMutation } from '../queries/correction';
import { AppText } from '../ui/AppText';
import { Button } from '../ui/Button';
import { Card } from '../ui/Card';
import { FormBanner } from '../ui/FormBanner';
import { FormMeasured, FormPhotos, FormText, setServerFieldErrors, withFormOnly } from '../ui/FormFields';
import { Notice } from '../ui/Notice';
import { ActionWrite, FINDING_WRITE_WORDS, isStale } from './rules';

type FixFormValues = SubmitFixInput & { photos: PickedPhoto[] };
type FixFormParsed = z.output<typeof submitFixSchema> & { photos: PickedPhoto[] };

/**
 * The fix's schema, and for a finding logged with a measured value the new measurement required
 * (the server refuses a fix without it with the same words).
 */
export function fixFormResolver(finding: Pick<FindingDetail, 'measuredText' | 'ruleResult' | 'catalogue'>) {
  const rule = finding.catalogue.rule;
  const schema = fixNeedsMeasurement(rule, finding)
    ? submitFixSchema.refine((v) => Boolean(v.measuredText), { message: newMeasurementNeeded(rule!), path: ['measuredText'] })
    : submitFixSchema;
  return withFormOnly<SubmitFixInput, unknown, z.output<typeof submitFixSchema>, { photos: PickedPhoto[] }>(zodResolver(schema), {
    photos: (photos) => (photos.length === 0 ? 'Add at least one photo of the fixed work.' : undefined),
  });
}

/**
 * The subcontractor's "Submit fix": what was done, one or more photos of the work and, for a
 * measured defect, the new measurement with its verdict against the finding's own limit as it is
 * typed; sent as one multipart write (same photo rules as a finding). A retry re-sends the same
 * write, so a flaky connection never makes a second fix.
 */
export function FixForm({
  jobId,
  finding,
  system,
  onStale,
  testID = 'fix-form',
}: {
  jobId: string;
  finding: FindingDetail;
  system: UnitSystem;
  /** Someone changed the finding first: the screen reloads it. */
  onStale: () => void;
  testID?: string;
}) {
  const submit = useSubmitFixMutation(jobId, finding.id);
  const [slot] = useState(() => new ActionWrite());
  const [done, setDone] = useState(false);
  const [queued, setQueued] = useState(false);
  const rule = finding.catalogue.rule;
  const resolver = useMemo(() => fixFormResolver(finding), [finding]);
  // The limit the finding was logged against; the server decides with the unit's limits where it had none.
  const resolve = useMemo(() => (rule ? sameLimitResolver(rule, finding.ruleResult, noLimits) : noLimits), [rule, finding.ruleResult]);
  const { control, handleSubmit, setError, reset, watch } = useForm<FixFormValues, unknown, FixFormParsed>({
    resolver,
    defaultValues: { note: '', measuredText: null, photos: [] },
  });
  // Any change after a failed send makes a new write (the old key belongs to other content).
  useEffect(() => {
    const sub = watch(() => slot.settled());
    return () => sub.unsubscribe();
  }, [watch, slot]);
  const photoCount = watch('photos').length;

  // A press being kept and sent: another press meanwhile keeps and sends nothing more (the button
  // is not busy until the screen re-renders).
  const pressed = useRef(false);
  const send = handleSubmit(async ({ photos, ...values }) => {
    if (pressed.current) return;
    pressed.current = true;
    const write = slot.take(() => labelWrite(submitFixWrite(jobId, finding.id, values, photos), finding.label));
    // Kept on the phone first, before anything re-renders: saved means saved, with its photos.
    await keepNow(write);
    submit.mutate(write, {
      onSuccess: (res) => {
        slot.settled();
        setQueued(isQueued(res));
        setDone(true);
        reset({ note: '', measuredText: null, photos: [] });
      },
      onError: (err) => {
        slot.settled(err);
        setServerFieldErrors(err, setError, ['note', 'measuredText', 'photos']);
        setError('root', { message: writeErrorMessage(err, FINDING_WRITE_WORDS) });
        if (isStale(err)) onStale();
      },
      onSettled: () => {
        pressed.current = false;
      },
    });
  });

  // No signal: the fix is kept on this phone and says so; it is not with the inspector yet.
  if (done && queued) {
    return (
      <Notice tone="caution" title="Fix saved on this phone, waiting to send" testID={`${testID}-waiting`}>
        It is sent with its photos when the signal is back. The list of work waiting to send is at the top of the screen.
      </Notice>
    );
  }

  if (done && finding.status === 'fix_submitted') {
    return (
      <Notice tone="success" title="Fix sent" testID={`${testID}-sent`}>
        The inspector re-inspects it next. You will see here whether it is accepted or returned.
      </Notice>
    );
  }

  return (
    <Card testID={testID}>
      <AppText variant="title" role="heading">
        Submit fix
      </AppText>
      {finding.returnCount > 0 ? (
        <AppText variant="small" muted>
          This finding came back {finding.returnCount} time{finding.returnCount === 1 ? '' : 's'}: read why in the history below before fixing again.
        </AppText>
      ) : null}
      <FormText
        control={control}
        name="note"
        label="What was fixed"
        multiline
        style={multilineStyle}
        limit={NOTE_LIMIT}
        placeholder="e.g. Replaced the chain with threaded rod, nuts and washers above and below."
        testID={`${testID}-note`}
        compact
      />
      {rule ? (
        <>
          <AppText variant="label">{fixNeedsMeasurement(rule, finding) ? 'New measurement after the fix (needed)' : 'New measurement after the fix (optional)'}</AppText>
          <FormMeasured control={control} name="measuredText" testID={`${testID}-measured`} rule={rule} resolve={resolve} system={system} />
        </>
      ) : null}
      <FormPhotos
        control={control}
        name="photos"
        label="Photos of the fixed work"
        photoLabel="Fix photo"
        testID={testID}
        max={MAX_PHOTOS}
        tooMany={`At most ${MAX_PHOTOS} photos with a fix.`}
      />
      <FormBanner control={control} testID={`${testID}-error`} />
      <Button
        label={photoCount ? `Submit fix with ${photoCount} photo${photoCount === 1 ? '' : 's'}` : 'Submit fix'}
        busy={submit.isPending}
        onPress={send}
        testID={`${testID}-submit`}
      />
    </Card>
  );
}

/** Room for a few lines, text from the top. */
const multilineStyle = { minHeight: 96, paddingVertical: 10, textAlignVertical: 'top' as const };

