/**
 * What a scanned code means on this job's scan screen: a unit of this job (open its check once it
 * is known to be there), a unit address of another job, or not a unit address at all. The wording
 * of each refusal lives here so the camera, the image file and the tests say the same thing.
 */
import { parseUnitAddress } from '../../shared/rules/unitAddress';

export type ScanOutcome = { kind: 'unit'; unitId: string } | { kind: 'other_job' } | { kind: 'not_a_unit' };

export function scanOutcome(text: string, jobId: string): ScanOutcome {
  const found = parseUnitAddress(text);
  if (!found) return { kind: 'not_a_unit' };
  if (found.jobId !== jobId.toLowerCase()) return { kind: 'other_job' };
  return { kind: 'unit', unitId: found.unitId };
}

export const SCAN_WORDS = {
  other_job: 'This label is for a unit of another job. Open that job first, then scan it again.',
  not_a_unit: 'That code is not a Trimout unit label. Scan the QR code on the unit’s label, or type the tag.',
  not_visible: 'This unit is not on this job, or it was removed. Check the label, or type the tag.',
  no_code: 'No QR code was found in that image. Take it closer and straight on, or type the tag.',
  checks_not_allowed: 'Unit checks are for the job’s inspectors and GC managers. Your findings are in the findings list.',
} as const;
