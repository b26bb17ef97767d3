/**
 * An inspector or the GC manager re-inspects a submitted fix: accept (→ closed) or return (→ open,
 * return count + 1, a reason). If-Match; in ONE transaction with its "accepted" / "returned" event.
 */
import { decide } from '../../shared/findingStatus';
import type { z } from 'zod';
import type { FindingDetail, reinspectionSchema } from '../../shared/schemas/findings';
import { recordFindingEvent } from '../services/findings';
import type { CommandContext } from './context';
import { authorise, detailOf, lockFinding, saveChange, type Precondition } from './findingWrites';

export async function reinspectFinding(ctx: CommandContext, findingId: string, input: z.infer<typeof reinspectionSchema>, pre: Precondition): Promise<FindingDetail> {
  const { actor, transaction } = ctx;
  const finding = await lockFinding(ctx, findingId);
  const to = await authorise(ctx, finding, decide(finding.status, input.verdict, actor.role, finding.loggedBy === actor.id), pre);
  const from = { status: finding.status, returnCount: finding.returnCount };
  finding.status = to;
  if (input.verdict === 'return') finding.returnCount += 1;
  await saveChange(ctx, finding);
  await recordFindingEvent(
    {
      findingId: finding.id,
      jobId: finding.jobId,
      actorId: actor.id,
      kind: input.verdict === 'accept' ? 'accepted' : 'returned',
      from,
      to: { status: to, returnCount: finding.returnCount },
      reason: input.reason || null,
    },
    transaction,
  );
  return detailOf(ctx, finding.id);
}
