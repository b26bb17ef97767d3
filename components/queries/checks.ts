import { useMutation, useQuery, useQueryClient, type QueryClient } from '@tanstack/react-query';
import type { RecordCheckInput, UnitCheckDto, UnitChecksResponse, WalkDetail, WalkDto } from '../../shared/schemas/findings';
import type { SessionResponse } from '../../shared/schemas/session';
import type { LevelDto, ListResponse, UnitDto, UnitModelDto } from '../../shared/schemas/setup';
import { ApiError, apiGet } from '../api/client';
import { jobPath, queryString } from '../api/lists';
import { newClientId, newWrite, sendWrite, type Write } from '../api/mutations';
import { labelWrite, submitWrite } from '../outbox';
import { rememberedOpenWalk, rememberOpenWalk } from '../outbox/walks';
import { levelKeys } from './levels';
import { sessionKeys } from './session';
import { setupKeys } from './setupKeys';
import { announceWalkStarted, refreshWalkData, walkKeys } from './walks';

export const checkKeys = {
  unit: (jobId: string, unitId: string) => [...walkKeys.job(jobId), 'checks', unitId] as const,
  /** The unit's register record (model, level, space) under the set-up keys, refreshed with them. */
  unitRecord: (jobId: string, unitId: string) => [...setupKeys.resource(jobId, 'units'), 'one', unitId] as const,
  model: (jobId: string, modelId: string) => [...setupKeys.resource(jobId, 'models'), 'one', modelId] as const,
};

/** GET /units/:unitId/checks: the unit's state, its current check and the history. */
export function useUnitChecksQuery(jobId: string, unitId: string) {
  return useQuery({
    queryKey: checkKeys.unit(jobId, unitId),
    queryFn: () => apiGet<UnitChecksResponse>(`${jobPath(jobId, 'units', unitId, 'checks')}${queryString({ limit: 10 })}`),
    enabled: Boolean(jobId && unitId),
  });
}

/** GET /units/:unitId (set-up): its model id, level and space. */
export function useUnitRecordQuery(jobId: string, unitId: string) {
  return useQuery({
    queryKey: checkKeys.unitRecord(jobId, unitId),
    queryFn: () => apiGet<UnitDto>(jobPath(jobId, 'units', unitId)),
    enabled: Boolean(jobId && unitId),
  });
}

/** GET /models/:modelId: the limits entered from the model's installation manual. */
export function useUnitModelQuery(jobId: string, modelId: string | null | undefined) {
  return useQuery({
    queryKey: checkKeys.model(jobId, modelId ?? ''),
    queryFn: () => apiGet<UnitModelDto>(jobPath(jobId, 'models', modelId ?? '')),
    enabled: Boolean(jobId && modelId),
  });
}

/** The write that records a unit check; made once per press of "Save" so a retry reuses its key. */
export function recordCheckWrite(jobId: string, unitId: string, input: RecordCheckInput, unitTag?: string): Write {
  const write = newWrite({ method: 'POST', path: jobPath(jobId, 'units', unitId, 'checks'), body: input });
  return unitTag ? labelWrite(write, `Unit ${unitTag}`) : write;
}

/**
 * The inspector's open walk on the level, started if there is none: every unit check belongs to
 * a walk (one inspector's pass over a level) without an extra tap.
 */
export async function ensureWalk(jobId: string, levelId: string, inspectorId: string, client?: QueryClient): Promise<string> {
  try {
    const id = await openOrStartWalk(jobId, levelId, inspectorId);
    rememberOpenWalk(inspectorId, jobId, levelId, id);
    return id;
  } catch (err) {
    if (!(err instanceof ApiError && err.status === 0)) throw err;
    // No signal: the walk this phone last knew open on the level (the check waits to send with it).
    const kept = rememberedOpenWalk(inspectorId, jobId, levelId);
    if (kept) return kept;
    // None known: the walk starts on the phone, named by an id made here, and waits to send ahead
    // of the checks that name it (the outbox sends in the order of saving).
    const id = newClientId();
    const level = client?.getQueryData<LevelDto[]>(levelKeys.list(jobId))?.find((l) => l.id === levelId);
    const write = newWrite({ method: 'POST', path: jobPath(jobId, 'walks'), body: { levelId, id } });
    await submitWrite(level ? labelWrite(write, level.name) : write);
    rememberOpenWalk(inspectorId, jobId, levelId, id);
    // The walk screen shows it open (with "Finish walk") until the server's own answer replaces it.
    if (client) {
      const me = client.getQueryData<SessionResponse>(sessionKeys.all)?.user;
      const walk: WalkDto = {
        id,
        levelId,
        levelName: level?.name ?? '',
        inspector: { id: inspectorId, name: me?.name ?? '' },
        startedAt: new Date().toISOString(),
        finishedAt: null,
        checkCount: 0,
        unitsChecked: 0,
        unitsInProgress: 0,
        findingCount: 0,
      };
      client.setQueryData(walkKeys.open(jobId, levelId, inspectorId), walk);
    }
    return id;
  }
}

async function openOrStartWalk(jobId: string, levelId: string, inspectorId: string): Promise<string> {
  const open = await apiGet<ListResponse<WalkDto>>(`${jobPath(jobId, 'walks')}${queryString({ levelId, inspectorId, open: 'true', limit: 1 })}`);
  const walk = open.items[0];
  if (walk) return walk.id;
  const started = await sendWrite<WalkDetail>(newWrite({ method: 'POST', path: jobPath(jobId, 'walks'), body: { levelId } }));
  announceWalkStarted(jobId, levelId);
  return started.id;
}

/**
 * POST /units/:unitId/checks, kept in the outbox first (no signal: it waits to send, see
 * components/outbox); refreshes the walk screens (states, coverage) when it settles.
 */
export function useRecordCheckMutation(jobId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    networkMode: 'always',
    mutationFn: (write: Write) => submitWrite<UnitCheckDto>(write),
    onSettled: () => refreshWalkData(queryClient, jobId),
  });
}
