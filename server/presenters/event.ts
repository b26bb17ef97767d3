/** Finding history entries (finding_events rows or models) → FindingEventDto. */
import type { FindingEventDto, FindingEventKind, PersonRef } from '../../shared/schemas/findings';

export interface EventLike {
  id: string;
  kind: FindingEventKind;
  at: Date;
  from: Record<string, unknown> | null;
  to: Record<string, unknown> | null;
  reason: string | null;
  photoIds: string[] | null;
}

export function presentEvent(e: EventLike, actor: PersonRef): FindingEventDto {
  return {
    id: e.id,
    kind: e.kind,
    actor: { id: actor.id, name: actor.name },
    at: new Date(e.at).toISOString(),
    from: e.from,
    to: e.to,
    reason: e.reason,
    photoIds: e.photoIds ?? [],
  };
}
