import { zodResolver } from '@hookform/resolvers/zod';
import type { z } from 'zod';
import { useEffect, useState } from 'react';
import { useForm } from 'react-hook-form';
import { NOTE_MAX, submitFixSchema, type FindingDetail, type SubmitFixInput } from '../../shared/schemas/findings';
import { writeErrorMessage } from '../api/writeErrors';
import { MAX_PHOTOS } from '../findings/FindingForm';
import type { PickedPhoto } from '../findings/PhotoPicker.types';
import { submitFixWrite, useSubmitFixMutation } from '../queries/correction';
import { AppText } from '../ui/AppText';
import { Button } from '../ui/Button';
import { Card } from '../ui/Card';
import { FormPhotos, FormText, setServerFieldErrors, withFormOnly } from '../ui/FormFields';
import { Notice } from '../ui/Notice';
import { ActionWrite, FINDING_WRITE_WORDS, isStale } from './rules';

type FixFormValues = SubmitFixInput & { photos: PickedPhoto[] };
type FixFormParsed = z.output<typeof submitFixSchema> & { photos: PickedPhoto[] };

const resolver = withFormOnly<SubmitFixInput, unknown, z.output<typeof submitFixSchema>, { photos: PickedPhoto[] }>(zodResolver(submitFixSchema), {
  photos: (photos) => (photos.length === 0 ? 'Add at least one photo of the fixed work.' : undefined),
});

/**
 * The subcontractor's "Submit fix": what was done and one or more photos of the work, sent as one
 * multipart write (same photo rules as a finding). A retry re-sends the same write, so a flaky
 * connection never makes a second fix.
 */
export function FixForm({
  jobId,
  finding,
  onStale,
  testID = 'fix-form',
}: {
  jobId: string;
  finding: FindingDetail;
  /** Someone changed the finding first: the screen reloads it. */
  onStale: () => void;
  testID?: string;
}) {
  const submit = useSubmitFixMutation(jobId, finding.id);
  const [slot] = useState(() => new ActionWrite());
  const [done, setDone] = useState(false);
  const { control, handleSubmit, setError, reset, watch, formState } = useForm<FixFormValues, unknown, FixFormParsed>({
    resolver,
    defaultValues: { note: '', photos: [] },
  });
  // Any change after a failed send makes a new write (the old key belongs to other content).
  useEffect(() => {
    const sub = watch(() => slot.settled());
    return () => sub.unsubscribe();
  }, [watch, slot]);
  const photoCount = watch('photos').length;

  const send = handleSubmit(({ photos, ...values }) => {
    const write = slot.take(() => submitFixWrite(jobId, finding.id, values, photos));
    submit.mutate(write, {
      onSuccess: () => {
        slot.settled();
        setDone(true);
        reset({ note: '', photos: [] });
      },
      onError: (err) => {
        slot.settled(err);
        setServerFieldErrors(err, setError, ['note']);
        setError('root', { message: writeErrorMessage(err, FINDING_WRITE_WORDS) });
        if (isStale(err)) onStale();
      },
    });
  });
  const formError = formState.errors.root?.message;

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
        maxLength={NOTE_MAX}
        placeholder="e.g. Replaced the chain with threaded rod, nuts and washers above and below."
        testID={`${testID}-note`}
        compact
      />
      <FormPhotos
        control={control}
        name="photos"
        label="Photos of the fixed work"
        photoLabel="Fix photo"
        testID={testID}
        max={MAX_PHOTOS}
        tooMany={`At most ${MAX_PHOTOS} photos with a fix.`}
      />
      {formError ? (
        <Notice tone="error" testID={`${testID}-error`}>
          {formError}
        </Notice>
      ) : null}
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

