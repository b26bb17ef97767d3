import { useEffect, useRef } from 'react';
import type { FieldValues, Path, UseFormSetError, UseFormWatch } from 'react-hook-form';
import type { CreateTestRecordInput } from '../../shared/schemas/testRecords';
import { ApiError } from '../api/client';
import { newClientId, type Write } from '../api/mutations';
import { writeErrorMessage } from '../api/writeErrors';
import { keepNow } from '../outbox';
import { createTestRecordWrite, useCreateTestRecordMutation, type RecordedTest, type StagedPhoto } from '../queries/testRecords';

/**
 * The one way a test record form sends: a write made once per press (a retry after a failure sends
 * the same Idempotency-Key and the same record id), kept on the phone at the press, then sent
 * through the outbox. A refusal puts the server's field messages on the fields of those names
 * (body paths: `gauge.resolution`, `units.2.unitId`) and one sentence above the form.
 */
export function useRecordSubmit<T extends FieldValues>({
  jobId,
  label,
  setError,
  watch,
  onRecorded,
}: {
  jobId: string;
  /** Names the record on the sync screen ("Pressure test · VRF-1"). */
  label: string;
  setError: UseFormSetError<T>;
  watch: UseFormWatch<T>;
  onRecorded: (record: RecordedTest) => void;
}) {
  const create = useCreateTestRecordMutation(jobId);
  const made = useRef<{ write: Write; id: string } | null>(null);
  // Any change after a failed send makes a new write (the old key belongs to other content).
  useEffect(() => {
    const sub = watch(() => {
      made.current = null;
    });
    return () => sub.unsubscribe();
  }, [watch]);
  // A press being kept on the phone: a second press meanwhile does nothing.
  const keeping = useRef(false);

  async function send(input: CreateTestRecordInput, photos: readonly StagedPhoto[]) {
    if (keeping.current || create.isPending) return;
    const w =
      made.current ??
      (() => {
        const id = input.id ?? newClientId();
        return { id, write: createTestRecordWrite(jobId, { ...input, id }, photos, label) };
      })();
    made.current = w;
    keeping.current = true;
    try {
      await keepNow(w.write);
    } finally {
      keeping.current = false;
    }
    create.mutate(w, {
      onSuccess: (record) => {
        made.current = null;
        onRecorded(record);
      },
      onError: (err) => {
        const fields = err instanceof ApiError ? Object.entries(err.fields) : [];
        for (const [field, message] of fields) setError(field as Path<T>, { message });
        setError('root' as Path<T>, { message: writeErrorMessage(err, { fieldsShown: fields.length > 0 }) });
        // A refusal (4xx) will not change on retry: the next press builds a fresh write.
        if (err instanceof ApiError && err.status >= 400 && err.status < 500) made.current = null;
      },
    });
  }
  return { send, pending: create.isPending };
}
