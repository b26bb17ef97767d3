import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type { Mark, PhotoMarks } from '../../shared/schemas/photoMarks';
import { apiGet } from '../api/client';
import { versionTag } from '../api/lists';
import { newWrite, type Write } from '../api/mutations';
import { isQueued, submitWrite, type Queued } from '../outbox';

export const photoMarkKeys = {
  detail: (photoId: string) => ['photo-marks', photoId] as const,
};

const marksPath = (photoId: string) => `/api/photos/${encodeURIComponent(photoId)}/marks`;

export function usePhotoMarksQuery(photoId: string, enabled = true) {
  return useQuery({
    queryKey: photoMarkKeys.detail(photoId),
    queryFn: () => apiGet<PhotoMarks>(marksPath(photoId)),
    enabled: Boolean(photoId) && enabled,
  });
}

/** The whole list of marks, against the version the editor opened (If-Match); an empty list clears them. */
export function savePhotoMarksWrite(photoId: string, marks: Mark[], version: number): Write {
  return newWrite({ method: 'PUT', path: marksPath(photoId), body: { marks }, ifMatch: versionTag(version) });
}

export function useSavePhotoMarksMutation(photoId: string, label: string) {
  const queryClient = useQueryClient();
  return useMutation({
    networkMode: 'always',
    mutationFn: (write: Write) => submitWrite<PhotoMarks>(write, label),
    onSuccess: (saved: PhotoMarks | Queued) => {
      // Nothing queued goes into the cache as if the server had it.
      if (!isQueued(saved)) queryClient.setQueryData(photoMarkKeys.detail(photoId), saved);
    },
  });
}
