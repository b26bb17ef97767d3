import { Link, useRouter } from 'expo-router';
import { useEffect, useMemo, useState } from 'react';
import { StyleSheet, useWindowDimensions, View } from 'react-native';
import type { FindingDto } from '../../shared/schemas/findings';
import type { JobDetail, LevelDto, UnitDto } from '../../shared/schemas/setup';
import { defectCodeWords } from '../../shared/rules/somethingElse';
import { ApiError, isConflict } from '../api/client';
import { useJobQuery } from '../queries/jobs';
import { useLevelsQuery } from '../queries/levels';
import {
  planImageUrl,
  uploadPlanWrite,
  useDeletePlanMutation,
  usePlacePinMutation,
  usePlanPinsQuery,
  useUploadPlanMutation,
  type PinTarget,
} from '../queries/plans';
import { colors, linkTarget, space } from '../theme';
import { AppText } from '../ui/AppText';
import { Button } from '../ui/Button';
import { Card } from '../ui/Card';
import { Notice } from '../ui/Notice';
import { Screen } from '../ui/Screen';
import { EmptyState, ErrorState, LoadingState } from '../ui/States';
import { usePointerWords } from '../ui/usePointerWords';
import { useWide } from '../ui/useWide';
import { FindingPinMark, UnitPinMark } from './PinMark';
import { PlanFilePicker } from './PlanFilePicker';
import { PlanLegend } from './PlanLegend';
import { PlanViewer } from './PlanViewer';
import type { PlanFindingPin, PlanUnitPin } from './PlanViewer.types';
import { links, type PlaceKind } from '../links';




/** A level's plan with the pins of its findings and units; upload, zoom, and place pins by tapping. */
export function PlanScreen({ jobId, levelId, place }: { jobId: string; levelId: string; place?: { kind: PlaceKind; id: string } }) {
  const job = useJobQuery(jobId);
  const levels = useLevelsQuery(jobId);
  const level = levels.data?.find((l) => l.id === levelId);
  const failed = job.isError ? job.error : levels.isError ? levels.error : null;
  return (
    <Screen testID="plan-screen" maxWidth={1200}>
      <Link href={links.job(jobId)} style={styles.back} testID="plan-back">
        <AppText variant="label" style={{ color: colors.spruce }}>
          ← Job overview
        </AppText>
      </Link>
      {failed ? (
        failed instanceof ApiError && failed.status === 404 ? (
          <EmptyState title="Job not found" body="This job does not exist, or you are not a member of it." testID="job-not-found" />
        ) : (
          <ErrorState message={failed.message} onRetry={() => void Promise.all([job.refetch(), levels.refetch()])} />
        )
      ) : !job.data || !levels.data ? (
        <LoadingState label="Loading the plan…" />
      ) : !level ? (
        <EmptyState title="Level not found" body="This level is not on the job any more." testID="level-not-found" />
      ) : (
        <PlanBody key={level.id} job={job.data} level={level} place={place} />
      )}
    </Screen>
  );
}

function PlanBody({ job, level, place }: { job: JobDetail; level: LevelDto; place?: { kind: PlaceKind; id: string } }) {
  const router = useRouter();
  const wide = useWide();
  const { height: windowHeight } = useWindowDimensions();
  const pins = usePlanPinsQuery(job.id, level.id);
  const upload = useUploadPlanMutation(job.id, level.id);
  const remove = useDeletePlanMutation(job.id, level.id);
  const placePin = usePlacePinMutation(job.id, level.id);
  const [placing, setPlacing] = useState<{ kind: PlaceKind; id: string } | null>(place ?? null);
  const [placed, setPlaced] = useState<{ kind: PlaceKind; id: string; name: string } | null>(null);
  const [pickError, setPickError] = useState<string | null>(null);
  const [confirmRemove, setConfirmRemove] = useState(false);
  const { Press } = usePointerWords();
  const canUpload = job.role === 'gc_manager' || job.role === 'inspector';
  const canPinFindings = canUpload;
  const canPinUnits = job.role === 'gc_manager';

  const target: PinTarget | null = useMemo(() => {
    if (!placing || !pins.data) return null;
    if (placing.kind === 'finding') {
      const item = pins.data.findings.find((f) => f.id === placing.id);
      return item ? { kind: 'finding', item } : null;
    }
    const item = pins.data.units.find((u) => u.id === placing.id);
    return item ? { kind: 'unit', item } : null;
  }, [placing, pins.data]);

  // Another "place" link followed while this screen is open (the URL's target changed).
  useEffect(() => {
    if (place) setPlacing({ kind: place.kind, id: place.id });
  }, [place?.kind, place?.id]); // eslint-disable-line react-hooks/exhaustive-deps

  // A target from the URL that is not on this level (or not visible to the caller): say so once loaded.
  const missingTarget = Boolean(placing && pins.data && !target);
  useEffect(() => {
    if (placing) setPlaced(null);
  }, [placing]);

  const findingPins: PlanFindingPin[] = (pins.data?.findings ?? []).flatMap((f) =>
    f.pinX !== null && f.pinY !== null && f.status !== 'voided'
      ? [{ id: f.id, label: f.label, number: f.number, code: f.code, status: f.status, severity: f.severity, overdue: f.overdue, x: f.pinX, y: f.pinY }]
      : [],
  );
  const unitPins: PlanUnitPin[] = (pins.data?.units ?? []).flatMap((u) => (u.pinX !== null && u.pinY !== null ? [{ id: u.id, tag: u.tag, x: u.pinX, y: u.pinY }] : []));
  const unplacedFindings = (pins.data?.findings ?? []).filter((f) => f.pinX === null && f.status !== 'closed');
  const unplacedUnits = (pins.data?.units ?? []).filter((u) => u.pinX === null);

  const nameOf = (t: PinTarget) => (t.kind === 'finding' ? `${t.item.label} ${defectCodeWords(t.item.code)}` : `Unit ${t.item.tag}`);

  const doPlace = (pin: { x: number; y: number } | null) => {
    if (!target || placePin.isPending) return;
    placePin.mutate(
      { target, pin },
      {
        onSuccess: () => {
          setPlaced(pin ? { kind: target.kind, id: target.item.id, name: nameOf(target) } : null);
          setPlacing(null);
          if (place) router.setParams({ place: undefined, id: undefined });
        },
      },
    );
  };

  const pickFile = (file: Parameters<typeof uploadPlanWrite>[2]) => {
    setPickError(null);
    upload.mutate(uploadPlanWrite(job.id, level.id, file));
  };

  const plan = level.plan;
  return (
    <>
      <View style={styles.head}>
        <AppText variant="small" muted>
          {job.name} · plan
        </AppText>
        <AppText variant="display" role="heading" testID="plan-level-name">
          {level.name}
        </AppText>
      </View>

      {upload.isError ? (
        <Notice tone="error" title="The plan was not uploaded" testID="plan-upload-error">
          {upload.error.message}
        </Notice>
      ) : null}
      {pickError ? (
        <Notice tone="error" testID="plan-pick-error">
          {pickError}
        </Notice>
      ) : null}
      {remove.isError ? (
        <Notice tone="error" testID="plan-remove-error">
          {isConflict(remove.error) ? 'Someone changed this level meanwhile; it has been reloaded. Try again.' : remove.error.message}
        </Notice>
      ) : null}

      {!plan ? (
        <EmptyState
          title="No plan for this level yet"
          body={
            canUpload
              ? 'Upload the floor plan as a PNG, JPEG or PDF (its first page is used), up to 15 MB. Findings and units can then be pinned on it.'
              : 'A GC manager or an inspector uploads the floor plan; pins of findings and units show on it.'
          }
          testID="plan-empty"
          action={
            canUpload ? (
              <PlanFilePicker label="Upload plan" onPick={pickFile} onError={setPickError} busy={upload.isPending} testID="plan-upload" />
            ) : undefined
          }
        />
      ) : (
        <>
          {placing ? (
            <Notice tone="info" title={target ? `Placing ${nameOf(target)}` : 'Placing a pin'} testID="plan-placing">
              {missingTarget
                ? 'That item is not on this level (or not yours to see). Pick another below.'
                : target
                  ? `${Press} the plan where it is${target.item.pinX !== null ? ' (it moves from where it is now)' : ''}. Pinch or use + and − to zoom first.`
                  : 'Loading…'}
            </Notice>
          ) : null}
          {placing ? (
            <View style={styles.row}>
              <Button label="Cancel placing" tone="secondary" testID="plan-place-cancel" onPress={() => setPlacing(null)} />
              {target && target.item.pinX !== null ? (
                <Button label="Remove its pin" tone="quiet" testID="plan-pin-remove" busy={placePin.isPending} onPress={() => doPlace(null)} />
              ) : null}
            </View>
          ) : null}
          {placePin.isError ? (
            <Notice tone="error" testID="plan-place-error">
              {isConflict(placePin.error) ? `Someone changed it meanwhile; the plan has been reloaded. ${Press} again.` : placePin.error.message}
            </Notice>
          ) : null}
          {placed ? (
            <Notice tone="success" testID="plan-placed">
              {`${placed.name} is on the plan.`}
            </Notice>
          ) : null}
          {placed?.kind === 'finding' ? (
            <Link href={links.finding(job.id, placed.id)} style={styles.inlineLink} testID="plan-placed-open">
              <AppText variant="label" style={{ color: colors.spruce }}>
                Open {placed.name} →
              </AppText>
            </Link>
          ) : null}

          {wide ? (
            <Card>
              <PlanLegend />
            </Card>
          ) : null}
          {pins.isError ? <ErrorState message={pins.error.message} onRetry={() => pins.refetch()} testID="plan-pins-error" /> : null}
          <PlanViewer
            imageUri={planImageUrl(job.id, level.id, plan.version)}
            planWidth={plan.width}
            planHeight={plan.height}
            findings={findingPins}
            units={unitPins}
            placing={Boolean(target)}
            onPlace={doPlace}
            onOpenFinding={(id) => router.push(links.finding(job.id, id))}
            onOpenUnit={(id) => router.push(links.unitCheck(job.id, id))}
            selectedId={placing?.id ?? placed?.id}
            wide={wide}
            windowHeight={windowHeight}
          />
          <AppText variant="small" muted testID="plan-counts">
            {pins.isPending
              ? 'Loading the pins…'
              : `${findingPins.length} finding${findingPins.length === 1 ? '' : 's'} and ${unitPins.length} unit${unitPins.length === 1 ? '' : 's'} on the plan. ${Press} a pin to open it.`}
          </AppText>
          {wide ? null : (
            <Card>
              <PlanLegend />
            </Card>
          )}

          {!placing && (canPinFindings || canPinUnits) && pins.data ? (
            <Unplaced
              findings={canPinFindings ? unplacedFindings : []}
              units={canPinUnits ? unplacedUnits : []}
              onPlace={(kind, id) => setPlacing({ kind, id })}
            />
          ) : null}

          {canUpload ? (
            <View style={styles.row}>
              <PlanFilePicker label="Replace plan" onPick={pickFile} onError={setPickError} busy={upload.isPending} testID="plan-replace" />
              {job.role === 'gc_manager' ? (
                <Button
                  label={confirmRemove ? 'Press again to remove the plan' : 'Remove plan'}
                  tone={confirmRemove ? 'danger' : 'quiet'}
                  testID="plan-remove"
                  busy={remove.isPending}
                  onPress={() => {
                    if (!confirmRemove) return setConfirmRemove(true);
                    setConfirmRemove(false);
                    remove.mutate(level);
                  }}
                />
              ) : null}
            </View>
          ) : null}
          {canUpload ? (
            <AppText variant="small" muted>
              {`Plan uploaded ${new Date(plan.uploadedAt).toLocaleDateString()} (${plan.width} × ${plan.height} px). A replacement keeps every pin where it is on the sheet, so use a revision of the same drawing; a PDF's first page is used.`}
            </AppText>
          ) : null}
        </>
      )}
    </>
  );
}

const UNPLACED_SHOWN = 12;

function Unplaced({ findings, units, onPlace }: { findings: FindingDto[]; units: UnitDto[]; onPlace: (kind: PlaceKind, id: string) => void }) {
  const [all, setAll] = useState(false);
  if (findings.length === 0 && units.length === 0) return null;
  const f = all ? findings : findings.slice(0, UNPLACED_SHOWN);
  const u = all ? units : units.slice(0, UNPLACED_SHOWN);
  const more = findings.length - f.length + (units.length - u.length);
  return (
    <Card testID="plan-unplaced">
      <AppText variant="heading" role="heading">
        Not on the plan yet
      </AppText>
      {f.map((x) => (
        <View key={x.id} style={styles.unplacedRow}>
          {x.status !== 'voided' ? <FindingPinMark status={x.status} severity={x.severity} overdue={x.overdue} size={24} /> : null}
          <AppText style={styles.grow} numberOfLines={1}>
            {`${x.label} ${defectCodeWords(x.code)} · ${x.title}${x.unitTag ? ` · ${x.unitTag}` : ''}`}
          </AppText>
          <Button label="Place" tone="secondary" aria-label={`Place finding ${x.label} on the plan`} testID={`plan-place-finding-${x.number}`} onPress={() => onPlace('finding', x.id)} />
        </View>
      ))}
      {u.map((x) => (
        <View key={x.id} style={styles.unplacedRow}>
          <UnitPinMark size={20} />
          <AppText style={styles.grow} numberOfLines={1}>
            {`Unit ${x.tag}${x.spaceName ? ` · ${x.spaceName}` : ''}`}
          </AppText>
          <Button label="Place" tone="secondary" aria-label={`Place unit ${x.tag} on the plan`} testID={`plan-place-unit-${x.tag}`} onPress={() => onPlace('unit', x.id)} />
        </View>
      ))}
      {more > 0 ? <Button label={`Show ${more} more`} tone="quiet" testID="plan-unplaced-more" onPress={() => setAll(true)} /> : null}
    </Card>
  );
}

const styles = StyleSheet.create({
  back: linkTarget,
  head: { gap: space.xs },
  row: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm, alignItems: 'center' },
  inlineLink: { alignSelf: 'flex-start' },
  unplacedRow: { flexDirection: 'row', alignItems: 'center', gap: space.sm, paddingVertical: space.xs, borderTopWidth: 1, borderTopColor: colors.line },
  grow: { flex: 1 },
});
