/**
 * Anyone who sees a finding comments on it: a "comment" event (the text as its reason). The
 * finding is locked like for a change, so a comment is ordered with the changes around it in the
 * history; its version does not rise (a comment is not a change of the finding).
 */
import type { z } from 'zod';
import type { commentSchema, FindingEventDto } from '../../shared/schemas/findings';
import { presentEvent } from '../presenters/event';
import { recordFindingEvent } from '../services/findings';
import type { CommandContext } from './context';
import { lockFinding } from './findingWrites';

export async function commentOnFinding(ctx: CommandContext, findingId: string, input: z.infer<typeof commentSchema>): Promise<FindingEventDto> {
  const finding = await lockFinding(ctx, findingId);
  const event = await recordFindingEvent({ findingId: finding.id, jobId: finding.jobId, actorId: ctx.actor.id, kind: 'comment', reason: input.text }, ctx.transaction);
  return presentEvent(event, ctx.actor);
}
