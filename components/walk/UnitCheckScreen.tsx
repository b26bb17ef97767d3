import { Link, useRouter, type Href } from 'expo-router';
import { PlanPinLink } from '../plans/PlanPinLink';
import { useMemo, useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { CATALOGUE_GROUPS } from '../../shared/catalogue/types';
import type { UnitChecksResponse } from '../../shared/schemas/findings';
import type { CatalogueItemDto, JobDetail, UnitDto, UnitModelDto } from '../../shared/schemas/setup';
import { UNIT_KINDS, type CheckMark } from '../../shared/words';
import { ApiError } from '../api/client';
import { FindingForm } from '../findings/FindingForm';
import { formatWhen } from '../findings/due';
import { useCatalogueQuery } from '../queries/catalogue';
import { ensureWalk, recordCheckWrite, useRecordCheckMutation, useUnitChecksQuery, useUnitModelQuery, useUnitRecordQuery } from '../queries/checks';
import { useJobQuery } from '../queries/jobs';
import { useSessionQuery } from '../queries/session';
import { useOpenWalkQuery } from '../queries/walks';
import { colors, space } from '../theme';
import { AppText } from '../ui/AppText';
import { Button } from '../ui/Button';
import { Card } from '../ui/Card';
import { Notice } from '../ui/Notice';
import { Screen } from '../ui/Screen';
import { EmptyState, ErrorState, LoadingState } from '../ui/States';
import { CheckItemCard } from './CheckItemCard';
import { limitResolverFor, measure } from './measure';
import { InspectorsOnly } from './LevelWalkScreen';
import { UnitStateBadge } from './UnitStateBadge';

const KIND_LABEL: Record<string, string> = Object.fromEntries(UNIT_KINDS.map((k) => [k.key, k.label]));

export function levelWalkHref(jobId: string, levelId: string, saved?: string): Href {
  const base = `/jobs/${encodeURIComponent(jobId)}/levels/${encodeURIComponent(levelId)}/walk`;
  return (saved ? `${base}?saved=${encodeURIComponent(saved)}` : base) as Href;
}

/** The unit check: every catalogue item that applies to the unit's kind, grouped, marked and measured. */
export function UnitCheckScreen({ jobId, unitId }: { jobId: string; unitId: string }) {
  const job = useJobQuery(jobId);
  const checks = useUnitChecksQuery(jobId, unitId);
  const record = useUnitRecordQuery(jobId, unitId);
  const model = useUnitModelQuery(jobId, record.data?.modelId);
  const catalogue = useCatalogueQuery(jobId, {});
  const failed = job.data?.role === 'subcontractor' ? undefined : [job, checks, record, catalogue].find((q) => q.isError);
  const notFound = failed?.error instanceof ApiError && failed.error.status === 404;
  return (
    <Screen testID="unit-check-screen" maxWidth={640}>
      {job.data?.role === 'subcontractor' ? (
        <InspectorsOnly jobId={jobId} />
      ) : failed ? (
        notFound ? (
          <EmptyState title="Unit not found" body="This unit does not exist on this job, or you are not a member of the job." testID="unit-not-found" />
        ) : (
          <ErrorState message={failed.error?.message ?? 'That did not load.'} onRetry={() => void Promise.all([job.refetch(), checks.refetch(), record.refetch(), catalogue.refetch()])} />
        )
      ) : !job.data || !checks.data || !record.data || !catalogue.data || (record.data.modelId && model.isPending) ? (
        <LoadingState label="Loading the unit…" />
      ) : (
        <UnitCheckBody
          job={job.data}
          checks={checks.data}
          unit={record.data}
          model={model.data ?? null}
          catalogue={catalogue.data}
        />
      )}
    </Screen>
  );
}

type Mode = { kind: 'check' } | { kind: 'finding'; item?: CatalogueItemDto; walkId: string | null };

function UnitCheckBody({
  job,
  checks,
  unit,
  model,
  catalogue,
}: {
  job: JobDetail;
  checks: UnitChecksResponse;
  unit: UnitDto;
  model: UnitModelDto | null;
  catalogue: readonly CatalogueItemDto[];
}) {
  const router = useRouter();
  const session = useSessionQuery();
  const userId = session.data?.user?.id;
  const openWalk = useOpenWalkQuery(job.id, unit.levelId, userId);
  const record = useRecordCheckMutation(job.id);
  const canCheck = job.role === 'inspector' || job.role === 'gc_manager';
  const items = useMemo(() => catalogue.filter((i) => i.unitKinds.includes(unit.kind) && !i.retiredAt), [catalogue, unit.kind]);
  const groups = useMemo(
    () => CATALOGUE_GROUPS.map((g) => ({ ...g, items: items.filter((i) => i.group === g.key) })).filter((g) => g.items.length > 0),
    [items],
  );
  const resolve = useMemo(() => limitResolverFor(model, job), [model, job]);

  // Start from the unit's current check: a re-check changes only what is different.
  const [marks, setMarks] = useState<Record<string, CheckMark>>(() =>
    Object.fromEntries((checks.current?.items ?? []).map((i) => [i.catalogueItemId, i.mark])),
  );
  const [texts, setTexts] = useState<Record<string, string>>(() =>
    Object.fromEntries((checks.current?.items ?? []).filter((i) => i.measuredText).map((i) => [i.catalogueItemId, i.measuredText ?? ''])),
  );
  const [logged, setLogged] = useState<Record<string, string[]>>({});
  const [mode, setMode] = useState<Mode>({ kind: 'check' });
  const [error, setError] = useState<string | null>(null);
  const [saving, setSaving] = useState(false);
  /** Codes of defects saved without a finding after a warning: the second tap saves. */
  const [warnedUnlogged, setWarnedUnlogged] = useState<string>('');
  // Named apart: a dependency spelled `x.current` reads to the hook linter as a ref.
  const currentCheck = checks.current;
  const previousMarks = useMemo(
    () => Object.fromEntries((currentCheck?.items ?? []).map((i) => [i.catalogueItemId, i.mark])),
    [currentCheck],
  );

  const markedCount = items.filter((i) => marks[i.id]).length;
  const defects = items.filter((i) => marks[i.id] === 'defect').length;
  const remaining = items.length - markedCount;
  const where = [unit.levelName, unit.spaceName, unit.systemName].filter(Boolean).join(' · ');

  function setMark(id: string, m: CheckMark) {
    setError(null);
    setMarks((now) => ({ ...now, [id]: m }));
  }

  const [opening, setOpening] = useState<string | null>(null);
  /** Opens the finding form inside the check (nothing marked is lost), within the inspector's walk. */
  async function openFinding(item?: CatalogueItemDto) {
    setError(null);
    setOpening(item?.id ?? 'other');
    let walkId: string | null = openWalk.data?.id ?? null;
    if (!walkId && userId && canCheck) walkId = await ensureWalk(job.id, unit.levelId, userId).catch(() => null);
    setOpening(null);
    setMode({ kind: 'finding', item, walkId });
  }

  function allOkForTheRest() {
    setError(null);
    setMarks((now) => {
      const next = { ...now };
      for (const i of items) if (!next[i.id]) next[i.id] = 'ok';
      return next;
    });
  }

  async function save() {
    setError(null);
    const marked = items.filter((i) => marks[i.id]);
    if (marked.length === 0) {
      setError('Mark at least one item, or tap “All OK for the rest”.');
      return;
    }
    const bad = marked.find((i) => i.measuredRule && (texts[i.id] ?? '').trim() && measure(i.measuredRule, texts[i.id] ?? '', resolve, job.unitSystem).kind === 'parse_error');
    if (bad) {
      setError(`${bad.code}: the measured value cannot be read. Correct it or clear it.`);
      return;
    }
    // A defect newly marked in this check with no finding behind it is a hole in the audit:
    // warn once, naming them; a second tap saves anyway (the finding may be logged later).
    const unlogged = marked.filter((i) => marks[i.id] === 'defect' && !logged[i.id]?.length && previousMarks[i.id] !== 'defect');
    const unloggedKey = unlogged.map((i) => i.code).join(', ');
    if (unlogged.length > 0 && warnedUnlogged !== unloggedKey) {
      setWarnedUnlogged(unloggedKey);
      setError(
        `${unlogged.length === 1 ? 'This item is' : 'These items are'} marked Defect with no finding logged: ${unloggedKey}. ` +
          'Tap “Log finding” on each, or tap Save again to save the check without them.',
      );
      return;
    }
    if (!userId) return;
    setSaving(true);
    try {
      const walkId = await ensureWalk(job.id, unit.levelId, userId);
      const write = recordCheckWrite(job.id, unit.id, {
        walkId,
        complete: marked.length === items.length,
        items: marked.map((i) => {
          const t = (texts[i.id] ?? '').trim();
          return { catalogueItemId: i.id, mark: marks[i.id]!, measuredText: i.measuredRule && t ? t : undefined };
        }),
      });
      await record.mutateAsync(write);
      router.push(levelWalkHref(job.id, unit.levelId, unit.tag));
    } catch (err) {
      setError(err instanceof ApiError ? err.message : 'That did not save. Try again.');
    } finally {
      setSaving(false);
    }
  }

  if (mode.kind === 'finding') {
    const item = mode.item;
    return (
      <>
        <Header job={job} unit={unit} checks={checks} where={where} compact />
        <FindingForm
          job={job}
          target={{ unitId: unit.id, levelId: unit.levelId, spaceId: unit.spaceId, label: `Unit ${unit.tag}` }}
          item={item}
          unitKind={unit.kind}
          measuredText={item ? texts[item.id] : undefined}
          walkId={mode.walkId}
          unitCheckId={null}
          resolve={resolve}
          onCancel={() => setMode({ kind: 'check' })}
          onLogged={(finding) => {
            if (item) setLogged((now) => ({ ...now, [item.id]: [...(now[item.id] ?? []), finding.label] }));
            else setMarks((now) => ({ ...now, [finding.catalogueItemId]: 'defect' }));
            if (!item) setLogged((now) => ({ ...now, [finding.catalogueItemId]: [...(now[finding.catalogueItemId] ?? []), finding.label] }));
            setMode({ kind: 'check' });
          }}
        />
      </>
    );
  }

  return (
    <>
      <Header job={job} unit={unit} checks={checks} where={where} />
      {items.length === 0 ? (
        <EmptyState
          title="Nothing to check for this kind"
          body={`The job's defect catalogue has no items for ${KIND_LABEL[unit.kind] ?? unit.kind}. A GC manager can add them in set-up.`}
          testID="unit-check-empty"
        />
      ) : (
        <>
          <Card>
            <AppText variant="heading" testID="unit-check-progress">
              {markedCount} of {items.length} marked
              {defects ? ` · ${defects} defect${defects === 1 ? '' : 's'}` : ''}
            </AppText>
            {canCheck && remaining > 0 ? (
              <Button label={`All OK for the rest (${remaining})`} tone="secondary" testID="unit-check-all-ok" onPress={allOkForTheRest} />
            ) : null}
          </Card>
          {!canCheck ? <Notice tone="info">Only inspectors and GC managers record unit checks. You can read the items here.</Notice> : null}
          {groups.map((g) => (
            <View key={g.key} style={styles.group} testID={`check-group-${g.key}`}>
              <AppText variant="title" role="heading">
                {g.label}
              </AppText>
              {g.items.map((item) => (
                <CheckItemCard
                  key={item.id}
                  item={item}
                  mark={marks[item.id]}
                  onMark={(m) => setMark(item.id, m)}
                  measuredText={texts[item.id] ?? ''}
                  onMeasured={(text, view) => {
                    setTexts((now) => ({ ...now, [item.id]: text }));
                    // A failed measurement proposes the defect.
                    if (view.kind === 'result' && view.result.status === 'fail') setMark(item.id, 'defect');
                  }}
                  resolve={resolve}
                  system={job.unitSystem}
                  logged={logged[item.id] ?? []}
                  onLogFinding={() => void openFinding(item)}
                  readOnly={!canCheck}
                />
              ))}
            </View>
          ))}
          {canCheck ? (
            <View style={styles.footer}>
              {error ? (
                <Notice tone="error" testID="unit-check-error">
                  {error}
                </Notice>
              ) : null}
              {remaining > 0 ? (
                <Button label={`All OK for the rest (${remaining})`} tone="secondary" testID="unit-check-all-ok-bottom" onPress={allOkForTheRest} />
              ) : null}
              <Button
                label={remaining === 0 ? 'Save unit check' : `Save, ${remaining} not marked yet`}
                testID="unit-check-save"
                busy={saving}
                onPress={() => void save()}
              />
              <Button
                label="Log a finding not listed here"
                tone="quiet"
                testID="unit-check-other-finding"
                busy={opening === 'other'}
                onPress={() => void openFinding()}
              />
            </View>
          ) : null}
        </>
      )}
    </>
  );
}

function Header({ job, unit, checks, where, compact }: { job: JobDetail; unit: UnitDto; checks: UnitChecksResponse; where: string; compact?: boolean }) {
  const last = checks.current;
  return (
    <View style={styles.head}>
      <Link href={levelWalkHref(job.id, unit.levelId)} style={styles.back} testID="unit-check-back">
        <AppText variant="label" style={{ color: colors.spruce }}>
          ← {unit.levelName}: all units
        </AppText>
      </Link>
      <AppText variant="display" role="heading" testID="unit-check-tag">
        {unit.tag}
      </AppText>
      <AppText muted>
        {KIND_LABEL[unit.kind] ?? unit.kind}
        {unit.modelName ? ` · ${unit.modelName}` : ''}
      </AppText>
      {where ? <AppText variant="small" muted>{where}</AppText> : null}
      <PlanPinLink jobId={job.id} levelId={unit.levelId} kind="unit" id={unit.id} pinned={unit.pinX !== null} canPlace={job.role === 'gc_manager'} testID="unit-plan-link" />
      {compact ? null : (
        <>
          <UnitStateBadge state={checks.unit.state} openFindings={checks.unit.openFindings} worstSeverity={checks.unit.worstSeverity} testID="unit-check-state" />
          {last ? (
            <AppText variant="small" muted testID="unit-check-last">
              {`Last checked ${formatWhen(last.checkedAt, job.timeZone)} by ${last.checkedBy.name}${last.complete ? '' : ' (not finished)'}. Its marks are filled in below.`}
            </AppText>
          ) : null}
        </>
      )}
    </View>
  );
}

const styles = StyleSheet.create({
  head: { gap: space.xs },
  back: { alignSelf: 'flex-start', paddingVertical: space.sm },
  group: { gap: space.md },
  footer: { gap: space.md, paddingBottom: space.xl },
});
