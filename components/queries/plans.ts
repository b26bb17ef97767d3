/**
 * Level plans and pins: the plan's metadata comes with the level (LevelDto.plan); the
 * image is GET /levels/:levelId/plan?v=<version>; pins are fields of findings and units.
 * Writes: upload (POST multipart, Idempotency-Key), delete (If-Match), and pin changes
 * (finding PATCH {pin} and unit PATCH {pinX, pinY}, both with If-Match).
 */
import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { planImageUrl, type Pin } from '../../shared/schemas/board';
import type { FindingDetail, FindingDto } from '../../shared/schemas/findings';
import type { LevelDto, UnitDto } from '../../shared/schemas/setup';
import { fetchAll, jobPath, versionTag } from '../api/lists';
import { newWrite, sendWrite, type Write } from '../api/mutations';
import { isQueued, submitWrite, type Queued } from '../outbox';
import { findingChangeWrite } from './correction';
import { setupKeys } from './setupKeys';
import { walkKeys } from './walks';

export { planImageUrl };

export const planKeys = {
  /** Under the walk keys: refreshed whenever a finding or a check is saved. */
  pins: (jobId: string, levelId: string) => [...walkKeys.job(jobId), 'plan-pins', levelId] as const,
};

export interface PlanPins {
  /** The level's findings that are not voided (a subcontractor's: their company's only). */
  findings: FindingDto[];
  units: UnitDto[];
}

/** Every finding (not voided) and unit of the level, with their pins or none. */
export function usePlanPinsQuery(jobId: string, levelId: string) {
  return useQuery({
    queryKey: planKeys.pins(jobId, levelId),
    queryFn: async (): Promise<PlanPins> => {
      const [findings, units] = await Promise.all([
        fetchAll<FindingDto>(jobPath(jobId, 'findings'), { levelId, status: 'open,fix_submitted,closed', sort: 'number' }),
        fetchAll<UnitDto>(jobPath(jobId, 'units'), { levelId }),
      ]);
      return { findings, units };
    },
    enabled: Boolean(jobId && levelId),
  });
}

/** A plan file picked in the browser (or a native file uri). */
export interface PlanFile {
  name: string;
  type: string;
  blob?: Blob;
  uri: string;
}

/** The upload of one plan file: made once per pick so a retry reuses its Idempotency-Key. */
export function uploadPlanWrite(jobId: string, levelId: string, file: PlanFile): Write {
  const form = new FormData();
  if (file.blob) form.append('file', file.blob, file.name);
  // React Native's FormData takes a { uri, name, type } file descriptor in place of a Blob.
  else form.append('file', { uri: file.uri, name: file.name, type: file.type } as unknown as Blob);
  return newWrite({ method: 'POST', path: jobPath(jobId, 'levels', levelId, 'plan'), body: form });
}

function useRefreshPlan(jobId: string, levelId: string) {
  const queryClient = useQueryClient();
  return () =>
    Promise.all([
      queryClient.invalidateQueries({ queryKey: setupKeys.job(jobId) }),
      queryClient.invalidateQueries({ queryKey: planKeys.pins(jobId, levelId) }),
    ]);
}

export function useUploadPlanMutation(jobId: string, levelId: string) {
  const refresh = useRefreshPlan(jobId, levelId);
  return useMutation({
    mutationFn: (write: Write) => sendWrite<LevelDto>(write),
    onSettled: refresh,
  });
}

export function useDeletePlanMutation(jobId: string, levelId: string) {
  const refresh = useRefreshPlan(jobId, levelId);
  return useMutation({
    mutationFn: (level: LevelDto) =>
      sendWrite<void>(newWrite({ method: 'DELETE', path: jobPath(jobId, 'levels', levelId, 'plan'), ifMatch: versionTag(level.version) })),
    onSettled: refresh,
  });
}

/** What a pin is being placed for. */
export type PinTarget = { kind: 'finding'; item: FindingDto } | { kind: 'unit'; item: UnitDto };

/** Places (or with null removes) the pin of a finding or a unit, with If-Match of the version shown. */
export function usePlacePinMutation(jobId: string, levelId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    // A finding's pin is field work: kept in the outbox first (no signal), sent after.
    networkMode: 'always',
    mutationFn: ({ target, pin }: { target: PinTarget; pin: Pin | null }): Promise<FindingDetail | UnitDto | Queued> =>
      target.kind === 'finding'
        ? submitWrite<FindingDetail>(findingChangeWrite(jobId, target.item.id, target.item.version, { pin }))
        : sendWrite<UnitDto>(
            newWrite({
              method: 'PATCH',
              path: jobPath(jobId, 'units', target.item.id),
              body: { pinX: pin?.x ?? null, pinY: pin?.y ?? null },
              ifMatch: versionTag(target.item.version),
            }),
          ),
    onSuccess: (saved, { target }) => {
      if (isQueued(saved)) return;
      // Show the new pin at once; the refetch below confirms it.
      queryClient.setQueryData<PlanPins>(planKeys.pins(jobId, levelId), (old) => {
        if (!old) return old;
        if (target.kind === 'finding') {
          const f = saved as FindingDetail;
          return { ...old, findings: old.findings.map((x) => (x.id === f.id ? { ...x, pinX: f.pinX, pinY: f.pinY, version: f.version } : x)) };
        }
        const u = saved as UnitDto;
        return { ...old, units: old.units.map((x) => (x.id === u.id ? u : x)) };
      });
    },
    onSettled: (_saved, _err, { target }) =>
      Promise.all([
        queryClient.invalidateQueries({ queryKey: walkKeys.job(jobId) }),
        target.kind === 'unit' ? queryClient.invalidateQueries({ queryKey: setupKeys.job(jobId) }) : undefined,
      ]),
  });
}
