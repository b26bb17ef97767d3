/** Photo rows → PhotoDto. Photos are served only through the job's authorised photo routes. */
import type { PhotoDto, PhotoStage } from '../../shared/schemas/findings';

/** A photo as the finding queries read it (photos joined to the uploader's name). */
export interface PhotoRow {
  id: string;
  content_type: string;
  width: number | null;
  height: number | null;
  byte_size: number | null;
  fix_id: string | null;
  stage: PhotoStage;
  uploaded_by: string | null;
  uploader_name: string | null;
  created_at: Date;
}

export function photoUrls(jobId: string, photoId: string): { url: string; thumbUrl: string } {
  const url = `/api/jobs/${jobId}/photos/${photoId}`;
  return { url, thumbUrl: `${url}/thumb` };
}

export function presentPhoto(jobId: string, p: PhotoRow): PhotoDto {
  return {
    id: p.id,
    ...photoUrls(jobId, p.id),
    contentType: p.content_type,
    width: p.width,
    height: p.height,
    bytes: p.byte_size,
    fixId: p.fix_id,
    stage: p.stage,
    uploadedBy: p.uploaded_by ? { id: p.uploaded_by, name: p.uploader_name ?? '' } : null,
    createdAt: new Date(p.created_at).toISOString(),
  };
}
