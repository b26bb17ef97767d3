/**
 * Changes to one finding (PATCH /findings/:findingId) and its events.
 */
import { z } from 'zod';
import { SEVERITIES } from '../../words';
import { id, dateOnly, note, pin, reason, optionalReason } from './fields';
import type { FindingEventDto } from './finding';

/** A new due date; `backdated: true` says a GC manager means a date before today (shared/rules/pastDue.ts). */
export const dueOnChange = z
  .object({ to: dateOnly, reason: optionalReason, backdated: z.boolean({ error: 'Say yes or no to back-dating.' }).optional() })
  .strict();

/**
 * PATCH /findings/:findingId → 200 FindingDetail (ETag). If-Match required. The body holds
 * exactly ONE change:
 *   { reassign: { companyId, reason } }           GC manager, inspector; open or fix-submitted
 *   { severity: { to, reason? } }                 GC manager, inspector; open or fix-submitted
 *   { dueOn: { to: 'YYYY-MM-DD', reason?, backdated? } }
 *                                                 GC manager, inspector; open or fix-submitted; a date before today
 *                                                 (job time zone) → 400 on dueOn.to unless a GC manager sends
 *                                                 backdated: true (anyone else → 403 backdate_forbidden)
 *   { void: { reason } }                          GC manager, the inspector who logged it; open or fix-submitted
 *   { reopen: { reason } }                        GC manager; closed
 *   { close: { note? } }                          inspector ("closed on walk"); open
 *   { pin: { x, y } | null }                      GC manager, inspector; any status but voided (place, move or remove the plan pin;
 *                                                 no event: a pin is where the item is drawn, not part of its history)
 * A subcontractor gets 403 for every change (nothing written).
 */
export const findingChangeSchema = z
  .object({
    reassign: z.object({ companyId: id('responsible company'), reason: reason('a reason for the reassignment') }).strict().optional(),
    severity: z
      .object({ to: z.enum(SEVERITIES, { error: 'Choose the severity: critical, major or minor.' }), reason: optionalReason })
      .strict()
      .optional(),
    dueOn: dueOnChange.optional(),
    void: z.object({ reason: reason('a reason for voiding') }).strict().optional(),
    reopen: z.object({ reason: reason('a reason for reopening') }).strict().optional(),
    close: z.object({ note: note.optional() }).strict().optional(),
    /** Where the finding is on its level's plan (fractions 0..1); null removes the pin. */
    pin: z.object({ x: pin(), y: pin() }).strict().nullable().optional(),
  })
  .strict()
  .refine((c) => Object.values(c).filter((v) => v !== undefined).length === 1, {
    message: 'Send exactly one change: reassign, severity, dueOn, void, reopen, close or pin.',
    path: ['change'],
  });
export type FindingChangeInput = z.input<typeof findingChangeSchema>;
export type FindingChangeParsed = z.output<typeof findingChangeSchema>;

/** GET /findings/:findingId/events → { items: FindingEventDto[] } oldest first (every role that sees the finding). */
export interface FindingEventsResponse {
  items: FindingEventDto[];
}
