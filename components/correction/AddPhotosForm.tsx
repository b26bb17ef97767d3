import { zodResolver } from '@hookform/resolvers/zod';
import { useEffect, useState } from 'react';
import { useForm } from 'react-hook-form';
import type { z } from 'zod';
import { MAX_PHOTOS_PER_REQUEST } from '../../shared/rules/photos';
import { addFindingPhotosSchema, NOTE_LIMIT, type AddFindingPhotosInput, type FindingDetail } from '../../shared/schemas/findings';
import { FIX_AND_REINSPECTION_WORDS, PHOTO_STAGE_LABELS } from '../../shared/words';
import { writeErrorMessage } from '../api/writeErrors';
import { isQueued } from '../outbox';
import type { PickedPhoto } from '../findings/PhotoPicker.types';
import { addFindingPhotosWrite, useAddFindingPhotosMutation } from '../queries/correction';
import { AppText } from '../ui/AppText';
import { Button } from '../ui/Button';
import { Card } from '../ui/Card';
import { FormBanner } from '../ui/FormBanner';
import { FormPhotos, FormText, setServerFieldErrors, withFormOnly } from '../ui/FormFields';
import { Notice } from '../ui/Notice';
import { ActionWrite, FINDING_WRITE_WORDS, isStale } from './rules';

type Values = AddFindingPhotosInput & { photos: PickedPhoto[] };
type Parsed = z.output<typeof addFindingPhotosSchema> & { photos: PickedPhoto[] };

/** How many more photos of the defect the finding takes (the server's limit per finding). */
export function photoRoom(finding: Pick<FindingDetail, 'photoCount'>): number {
  return Math.max(MAX_PHOTOS_PER_REQUEST - finding.photoCount, 0);
}

export const addPhotosResolver = withFormOnly<AddFindingPhotosInput, unknown, z.output<typeof addFindingPhotosSchema>, { photos: PickedPhoto[] }>(
  zodResolver(addFindingPhotosSchema),
  { photos: (photos) => (photos.length === 0 ? 'Add at least one photo.' : undefined) },
);

/**
 * More photos of the defect after the finding was logged (inspector, GC manager; while it is
 * open): picked or taken here, with an optional note kept in the history, sent as one write.
 */
export function AddPhotosForm({ jobId, finding, onStale, testID = 'add-photos' }: { jobId: string; finding: FindingDetail; onStale: () => void; testID?: string }) {
  const add = useAddFindingPhotosMutation(jobId, finding.id);
  const [slot] = useState(() => new ActionWrite());
  const [added, setAdded] = useState<{ count: number; waiting: boolean } | null>(null);
  const room = photoRoom(finding);
  const { control, handleSubmit, setError, reset, watch } = useForm<Values, unknown, Parsed>({
    resolver: addPhotosResolver,
    defaultValues: { note: '', photos: [] },
  });
  useEffect(() => {
    const sub = watch(() => slot.settled());
    return () => sub.unsubscribe();
  }, [watch, slot]);
  const count = watch('photos').length;

  const send = handleSubmit(({ photos, note }) => {
    const write = slot.take(() => addFindingPhotosWrite(jobId, finding.id, note ? { note } : {}, photos));
    add.mutate(write, {
      onSuccess: (answer) => {
        slot.settled();
        setAdded({ count: photos.length, waiting: isQueued(answer) });
        reset({ note: '', photos: [] });
      },
      onError: (err) => {
        slot.settled(err);
        setServerFieldErrors(err, setError, ['note', 'photos']);
        setError('root', { message: writeErrorMessage(err, FINDING_WRITE_WORDS) });
        if (isStale(err)) onStale();
      },
    });
  });

  return (
    <Card testID={testID}>
      <AppText variant="title" role="heading">
        {FIX_AND_REINSPECTION_WORDS.addPhotos}
      </AppText>
      {added ? (
        <Notice tone={added.waiting ? 'info' : 'success'} testID={`${testID}-done`}>
          {added.count === 1 ? '1 photo' : `${added.count} photos`} {added.waiting ? 'waiting to send' : 'added'} to {finding.label}.
        </Notice>
      ) : null}
      {room === 0 ? (
        <AppText muted testID={`${testID}-full`}>
          {finding.label} has {MAX_PHOTOS_PER_REQUEST} photos of the defect, the most a finding carries.
        </AppText>
      ) : (
        <>
          <FormPhotos
            control={control}
            name="photos"
            label="New photos"
            photoLabel={PHOTO_STAGE_LABELS.finding}
            testID={testID}
            max={room}
            tooMany={`${finding.label} takes ${room} more photo${room === 1 ? '' : 's'} at most.`}
          />
          <FormText control={control} name="note" label="What they show (optional)" limit={NOTE_LIMIT} testID={`${testID}-note`} compact />
          <FormBanner control={control} testID={`${testID}-error`} />
          <Button
            label={count ? `Add ${count} photo${count === 1 ? '' : 's'} to ${finding.label}` : `Add photos to ${finding.label}`}
            busy={add.isPending}
            onPress={send}
            testID={`${testID}-submit`}
          />
        </>
      )}
    </Card>
  );
}
