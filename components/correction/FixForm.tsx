import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { NOTE_MAX, submitFixSchema, type FindingDetail } from '../../shared/schemas/findings';
import { CameraCapture } from '../findings/CameraCapture';
import { MAX_PHOTOS } from '../findings/FindingForm';
import { PhotoPicker } from '../findings/PhotoPicker';
import type { PickedPhoto } from '../findings/PhotoPicker.types';
import { PhotoStrip } from '../findings/PhotoStrip';
import { submitFixWrite, useSubmitFixMutation } from '../queries/correction';
import { colors, space } from '../theme';
import { AppText } from '../ui/AppText';
import { Button } from '../ui/Button';
import { Card } from '../ui/Card';
import { Notice } from '../ui/Notice';
import { TextField } from '../ui/TextField';
import { ActionWrite, isStale, writeErrorMessage } from './rules';

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
  const [note, setNote] = useState('');
  const [photos, setPhotos] = useState<PickedPhoto[]>([]);
  const [errors, setErrors] = useState<{ note?: string; photos?: string; form?: string }>({});
  const [done, setDone] = useState(false);

  function addPhotos(more: PickedPhoto[]) {
    slot.settled();
    setErrors((e) => ({ ...e, photos: undefined }));
    setPhotos((now) => {
      const room = MAX_PHOTOS - now.length;
      if (more.length > room) setErrors((e) => ({ ...e, photos: `At most ${MAX_PHOTOS} photos with a fix.` }));
      return [...now, ...more.slice(0, Math.max(room, 0))];
    });
  }

  function send() {
    const parsed = submitFixSchema.safeParse({ note });
    const next: typeof errors = {};
    if (!parsed.success) next.note = parsed.error.issues[0]?.message ?? 'Say what was fixed.';
    if (photos.length === 0) next.photos = 'Add at least one photo of the fixed work.';
    setErrors(next);
    if (!parsed.success || photos.length === 0) return;
    const write = slot.take(() => submitFixWrite(jobId, finding.id, parsed.data, photos));
    submit.mutate(write, {
      onSuccess: () => {
        slot.settled();
        setDone(true);
        setNote('');
        setPhotos([]);
      },
      onError: (err) => {
        slot.settled(err);
        setErrors({ form: writeErrorMessage(err) });
        if (isStale(err)) onStale();
      },
    });
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
      <TextField
        label="What was fixed"
        value={note}
        onChangeText={(t) => {
          slot.settled();
          setNote(t);
        }}
        multiline
        style={multilineStyle}
        maxLength={NOTE_MAX}
        placeholder="e.g. Replaced the chain with threaded rod, nuts and washers above and below."
        error={errors.note}
        testID={`${testID}-note`}
        compact
      />
      <View style={styles.photos}>
        <AppText variant="label">
          Photos of the fixed work ({photos.length} of at most {MAX_PHOTOS})
        </AppText>
        <PhotoStrip
          testID={`${testID}-photos`}
          photos={photos.map((p, i) => ({ key: p.key, thumbUri: p.uri, fullUri: p.uri, label: `Fix photo ${i + 1}` }))}
          onRemove={(key) => {
            slot.settled();
            setPhotos((now) => now.filter((p) => p.key !== key));
          }}
        />
        <PhotoPicker
          label="Add photos from files"
          testID={`${testID}-files`}
          disabled={photos.length >= MAX_PHOTOS}
          onPick={addPhotos}
          onError={(m) => setErrors((e) => ({ ...e, photos: m }))}
        />
        <CameraCapture testID={`${testID}-camera`} disabled={photos.length >= MAX_PHOTOS} onPhoto={(p) => addPhotos([p])} />
        {errors.photos ? (
          <AppText variant="small" role="alert" style={styles.error} testID={`${testID}-photos-error`}>
            {errors.photos}
          </AppText>
        ) : null}
      </View>
      {errors.form ? (
        <Notice tone="error" testID={`${testID}-error`}>
          {errors.form}
        </Notice>
      ) : null}
      <Button
        label={photos.length ? `Submit fix with ${photos.length} photo${photos.length === 1 ? '' : 's'}` : 'Submit fix'}
        busy={submit.isPending}
        onPress={send}
        testID={`${testID}-submit`}
      />
    </Card>
  );
}

/** Room for a few lines, text from the top. */
const multilineStyle = { minHeight: 96, paddingVertical: 10, textAlignVertical: 'top' as const };

const styles = StyleSheet.create({
  photos: { gap: space.sm },
  error: { color: colors.danger },
});
