import { OTHER_DEFECT_CODE } from '../../shared/rules/somethingElse';
import { SOMETHING_ELSE, unitKindLabel } from '../../shared/words';
import { links } from '../links';
import { useQueryClient } from '@tanstack/react-query';
import { useRouter } from 'expo-router';
import { UnitWaiting, useSavedCheckWords } from '../outbox/Waiting';
import { PlanPinLink } from '../plans/PlanPinLink';
import { useEffect, useMemo, useRef, useState, type ReactNode, type Ref } from 'react';
import { Pressable, ScrollView, StyleSheet, View } from 'react-native';
import { CATALOGUE_GROUPS } from '../../shared/catalogue/types';
import type { UnitChecksResponse } from '../../shared/schemas/findings';
import type { CatalogueItemDto, JobDetail, UnitDto, UnitModelDto } from '../../shared/schemas/setup';
import { type CheckMark } from '../../shared/words';
import { ApiError } from '../api/client';
import { checkDraftKey, clearCheckDraft, draftDiffers, readCheckDraft, writeCheckDraft, type CheckDraft } from '../drafts/checkDraft';
import { clearFindingDrafts, findingDraftKey } from '../drafts/findingDraft';
import type { Stored } from '../drafts/store';
import { FindingForm } from '../findings/FindingForm';
import { formatWhen } from '../findings/due';
import { useCatalogueQuery } from '../queries/catalogue';
import { ensureWalk, recordCheckWrite, useRecordCheckMutation, useUnitChecksQuery, useUnitModelQuery, useUnitRecordQuery } from '../queries/checks';
import { useJobQuery } from '../queries/jobs';
import { useSessionQuery } from '../queries/session';
import { useOpenWalkQuery } from '../queries/walks';
import { choiceChip, colors, radius, space, touchTarget } from '../theme';
import { AppText } from '../ui/AppText';
import { Button } from '../ui/Button';
import { Card } from '../ui/Card';
import { Notice } from '../ui/Notice';
import { EmptyState, ErrorState, LoadingState } from '../ui/States';
import { TextField } from '../ui/TextField';
import { CheckItemRow } from './CheckItemRow';
import { confirmLeave, useLeaveGuard } from './leaveGuard';
import { InspectorsOnly } from './LevelWalkScreen';
import { limitResolverFor, measure } from './measure';
import { ExportLink } from '../exports/ExportLink';
import { reportUrls } from '../reports/reportUrls';
import { UnitStateBadge } from './UnitStateBadge';
import { nextUnitAfter, useUnresolvedFindingsQuery, useWalkOrderQuery } from './walkData';
import { usePointerWords } from '../ui/usePointerWords';

/** Section names short enough for the jump bar's chips. */
const SHORT_GROUP: Record<string, string> = {
  mounting: 'Mounting',
  clearance: 'Clearances',
  drainage: 'Drainage',
  penetrations: 'Penetrations',
  panels: 'Panels',
  wiring: 'Wiring',
  sensors: 'Sensors',
  piping: 'Piping',
  controls: 'Controls',
  labelling: 'Labels',
};


/** A unit check with the confirmation of the unit saved just before ("Save and next unit"). */

/** Brings a row into view (web: the DOM node of a View). Native builds keep the scroll where it is. */
function scrollIntoView(node: View | null | undefined, block: 'center' | 'start' = 'center') {
  const el = node as unknown as { scrollIntoView?: (o: { block: string }) => void } | null | undefined;
  el?.scrollIntoView?.({ block });
}

/** "10:42" today in the job's time zone, else "2 Dec 2026, 10:42". */
function draftTime(iso: string, timeZone: string): string {
  try {
    const day = (d: Date) => d.toLocaleDateString('en-GB', { timeZone });
    const at = new Date(iso);
    if (day(at) === day(new Date())) return at.toLocaleTimeString('en-GB', { timeZone, hour: '2-digit', minute: '2-digit' });
  } catch {
    // fall through to the full form
  }
  return formatWhen(iso, timeZone);
}

/** The unit check: every catalogue item that applies to the unit's kind, grouped, marked and measured. */
export function UnitCheckScreen({ jobId, unitId, saved }: { jobId: string; unitId: string; saved?: string }) {
  const job = useJobQuery(jobId);
  const checks = useUnitChecksQuery(jobId, unitId);
  const record = useUnitRecordQuery(jobId, unitId);
  const model = useUnitModelQuery(jobId, record.data?.modelId);
  const catalogue = useCatalogueQuery(jobId, {});
  const unresolved = useUnresolvedFindingsQuery(jobId, unitId);
  const session = useSessionQuery();
  const inspector = job.data?.role !== 'subcontractor';
  const failed = !inspector ? undefined : [job, checks, record, catalogue, unresolved].find((q) => q.isLoadingError);
  const notFound = failed?.error instanceof ApiError && failed.error.status === 404;
  const frame = (children: ReactNode, bar?: ReactNode) => <CheckFrame bar={bar}>{children}</CheckFrame>;
  if (job.data && !inspector) return frame(<InspectorsOnly jobId={jobId} />);
  if (failed) {
    return frame(
      notFound ? (
        <EmptyState title="Unit not found" body="This unit does not exist on this job, or you are not a member of the job." testID="unit-not-found" />
      ) : (
        <ErrorState
          message={failed.error?.message ?? 'That did not load.'}
          onRetry={() => void Promise.all([job.refetch(), checks.refetch(), record.refetch(), catalogue.refetch(), unresolved.refetch()])}
        />
      ),
    );
  }
  if (!job.data || !checks.data || !record.data || !catalogue.data || !unresolved.data || !session.data?.user || (record.data.modelId && model.isPending)) {
    return frame(<LoadingState label="Loading the unit…" />);
  }
  return (
    <UnitCheckBody
      key={record.data.id}
      job={job.data}
      checks={checks.data}
      unit={record.data}
      model={model.data ?? null}
      catalogue={catalogue.data}
      unresolved={unresolved.data}
      userId={session.data.user.id}
      saved={saved}
    />
  );
}

/**
 * The page: the checklist scrolls, the action bar stays at the bottom (a phone's thumb reaches
 * it; "Save" used to sit about 14,500 px down a cassette's checklist).
 */
function CheckFrame({ children, bar, scrollRef }: { children: ReactNode; bar?: ReactNode; scrollRef?: Ref<ScrollView> }) {
  return (
    <View style={styles.frame} testID="unit-check-screen">
      <ScrollView ref={scrollRef} style={styles.scroll} contentContainerStyle={styles.content} testID="unit-check-scroll">
        <View style={styles.column}>{children}</View>
      </ScrollView>
      {bar}
    </View>
  );
}

type Mode = { kind: 'check' } | { kind: 'finding'; item?: CatalogueItemDto; walkId: string | null };
type SaveTo = 'next' | 'level';

function UnitCheckBody({
  job,
  checks,
  unit,
  model,
  catalogue,
  unresolved,
  userId,
  saved,
}: {
  job: JobDetail;
  checks: UnitChecksResponse;
  unit: UnitDto;
  model: UnitModelDto | null;
  catalogue: readonly CatalogueItemDto[];
  unresolved: readonly { catalogueItemId: string; label: string }[];
  userId: string;
  saved?: string;
}) {
  const router = useRouter();
  const { press, Press } = usePointerWords();
  const openWalk = useOpenWalkQuery(job.id, unit.levelId, userId);
  const savedWords = useSavedCheckWords(job.id, saved);
  const order = useWalkOrderQuery(job.id, unit.levelId);
  const record = useRecordCheckMutation(job.id);
  const queryClient = useQueryClient();
  const canCheck = job.role === 'inspector' || job.role === 'gc_manager';
  const items = useMemo(() => catalogue.filter((i) => i.unitKinds.includes(unit.kind) && !i.retiredAt), [catalogue, unit.kind]);
  const resolve = useMemo(() => limitResolverFor(model, job, unit), [model, job, unit]);
  const openOn = useMemo(() => {
    const map: Record<string, string[]> = {};
    for (const f of unresolved) (map[f.catalogueItemId] ??= []).push(f.label);
    return map;
  }, [unresolved]);

  // Start from the unit's current check: a re-check changes only what is different.
  const currentCheck = checks.current;
  const base = useMemo(
    () => ({
      marks: Object.fromEntries((currentCheck?.items ?? []).map((i) => [i.catalogueItemId, i.mark])) as Record<string, CheckMark>,
      texts: Object.fromEntries((currentCheck?.items ?? []).filter((i) => i.measuredText).map((i) => [i.catalogueItemId, i.measuredText ?? ''])) as Record<string, string>,
    }),
    [currentCheck],
  );
  const draftKey = checkDraftKey(userId, job.id, unit.id);
  // A draft left on this phone (reload, Back, a closed tab) is offered before anything is changed.
  const [offer, setOffer] = useState<Stored<CheckDraft> | null>(() => {
    const found = readCheckDraft(draftKey);
    if (found && !draftDiffers(found.data, base)) {
      clearCheckDraft(draftKey);
      return null;
    }
    return found;
  });
  const [marks, setMarks] = useState<Record<string, CheckMark>>(base.marks);
  const [texts, setTexts] = useState<Record<string, string>>(base.texts);
  const [logged, setLogged] = useState<Record<string, string[]>>({});
  const [mode, setMode] = useState<Mode>({ kind: 'check' });
  const [error, setError] = useState<string | null>(null);
  const [itemErrors, setItemErrors] = useState<Record<string, string>>({});
  const [saving, setSaving] = useState<SaveTo | null>(null);
  const [allOkLeft, setAllOkLeft] = useState<{ marked: number; measured: number; open: number } | null>(null);
  const [confirmation, setConfirmation] = useState<{ itemId: string; text: string } | null>(null);
  const [scrollTo, setScrollTo] = useState<string | null>(null);
  const [query, setQuery] = useState('');
  /** Codes of defects saved without a finding after a warning: the second tap saves. */
  const [warnedUnlogged, setWarnedUnlogged] = useState<string>('');
  const rows = useRef<Record<string, View | null>>({});
  const sections = useRef<Record<string, View | null>>({});
  const scrollRef = useRef<ScrollView>(null);
  const done = useRef(false);

  const openFindingId = mode.kind === 'finding' ? (mode.item?.id ?? 'other') : null;
  const dirty = draftDiffers({ marks, texts, logged }, base);

  // Kept on the phone the moment anything changes; nothing is written until the offer is answered.
  useEffect(() => {
    if (offer || done.current) return;
    if (dirty || openFindingId) writeCheckDraft(draftKey, { unitTag: unit.tag, baseCheckId: currentCheck?.id ?? null, marks, texts, logged, openFinding: openFindingId });
    else clearCheckDraft(draftKey);
  }, [offer, dirty, marks, texts, logged, openFindingId, draftKey, unit.tag, currentCheck]);

  const leaveMessage = `Leave the check of ${unit.tag}? Your marks are not saved yet; they stay on this phone as a draft.`;
  useLeaveGuard(canCheck && dirty && !done.current, leaveMessage, () => router.back());

  // Back at the item after logging (or leaving) a finding from it.
  useEffect(() => {
    if (mode.kind !== 'check' || !scrollTo) return;
    scrollIntoView(rows.current[scrollTo]);
    setScrollTo(null);
  }, [mode, scrollTo]);

  const needle = query.trim().toLowerCase();
  const shown = useMemo(
    () => (needle ? items.filter((i) => `${i.code} ${i.title} ${i.description}`.toLowerCase().includes(needle)) : items),
    [items, needle],
  );
  const groups = useMemo(
    () => CATALOGUE_GROUPS.map((g) => ({ ...g, items: shown.filter((i) => i.group === g.key) })).filter((g) => g.items.length > 0),
    [shown],
  );

  const markedCount = items.filter((i) => marks[i.id]).length;
  const defects = items.filter((i) => marks[i.id] === 'defect').length;
  const rest = items.filter((i) => !marks[i.id]);
  const restOk = rest.filter((i) => !i.measuredRule && !openOn[i.id]?.length);
  const where = [unit.levelName, unit.spaceName, unit.systemName].filter(Boolean).join(' · ');
  const next = order.data ? nextUnitAfter(order.data, unit.id) : null;

  function setMark(id: string, m: CheckMark | undefined) {
    setError(null);
    if (m === 'ok' && openOn[id]?.length) {
      setItemErrors((now) => ({ ...now, [id]: `${openOn[id]!.join(', ')} is not closed: mark it Defect, or close the finding first.` }));
      return;
    }
    setItemErrors((now) => {
      if (!now[id]) return now;
      const { [id]: _gone, ...others } = now;
      return others;
    });
    setMarks((now) => {
      const copy = { ...now };
      if (m) copy[id] = m;
      else delete copy[id];
      return copy;
    });
  }

  const [opening, setOpening] = useState<string | null>(null);
  /** Opens the finding form inside the check (nothing marked is lost), within the inspector's walk. */
  async function openFinding(item?: CatalogueItemDto) {
    setError(null);
    setOpening(item?.id ?? 'other');
    let walkId: string | null = openWalk.data?.id ?? null;
    if (!walkId && canCheck) walkId = await ensureWalk(job.id, unit.levelId, userId, queryClient).catch(() => null);
    setOpening(null);
    setMode({ kind: 'finding', item, walkId });
    scrollRef.current?.scrollTo({ y: 0, animated: false });
  }

  /**
   * Marks OK every item not marked yet, except those that need an answer of their own: a
   * measurement or a yes/no test, and an item with a finding still open on this unit.
   */
  function allOkForTheRest() {
    setError(null);
    const left = { marked: restOk.length, measured: rest.filter((i) => i.measuredRule).length, open: rest.filter((i) => !i.measuredRule && openOn[i.id]?.length).length };
    setMarks((now) => {
      const copy = { ...now };
      for (const i of restOk) copy[i.id] ??= 'ok';
      return copy;
    });
    setAllOkLeft(left);
  }

  function continueDraft() {
    if (!offer) return;
    const d = offer.data;
    const known = new Set(items.map((i) => i.id));
    const keep = <T,>(r: Record<string, T>) => Object.fromEntries(Object.entries(r).filter(([k]) => known.has(k))) as Record<string, T>;
    setMarks(keep(d.marks));
    setTexts(keep(d.texts));
    setLogged(keep(d.logged));
    setOffer(null);
    if (d.openFinding) {
      const item = items.find((i) => i.id === d.openFinding);
      if (item || d.openFinding === 'other') void openFinding(item);
    }
  }

  function discardDraft() {
    clearCheckDraft(draftKey);
    clearFindingDrafts(userId, job.id, unit.id);
    setOffer(null);
  }

  async function leave() {
    if (dirty && canCheck && !(await confirmLeave(leaveMessage))) return;
    done.current = true;
    router.push(links.levelWalk(job.id, unit.levelId));
  }

  async function save(to: SaveTo) {
    setError(null);
    const marked = items.filter((i) => marks[i.id]);
    if (marked.length === 0) {
      setError(`Mark at least one item, or ${press} “All OK for the rest”.`);
      return;
    }
    const bad = marked.find((i) => i.measuredRule && (texts[i.id] ?? '').trim() && measure(i.measuredRule, texts[i.id] ?? '', resolve, job.unitSystem).kind === 'parse_error');
    if (bad) {
      setError(`${bad.code}: the measured value cannot be read. Correct it or clear it.`);
      scrollIntoView(rows.current[bad.id]);
      return;
    }
    const okOverOpen = marked.filter((i) => marks[i.id] === 'ok' && openOn[i.id]?.length);
    if (okOverOpen.length) {
      setItemErrors(Object.fromEntries(okOverOpen.map((i) => [i.id, `${openOn[i.id]!.join(', ')} is not closed: this item cannot be saved as OK.`])));
      setError(`${okOverOpen.map((i) => i.code).join(', ')}: marked OK with a finding still open. Mark ${okOverOpen.length === 1 ? 'it' : 'them'} Defect.`);
      scrollIntoView(rows.current[okOverOpen[0]!.id]);
      return;
    }
    // A defect newly marked in this check with no finding behind it is a hole in the audit:
    // warn once, naming them; a second tap saves anyway (the finding may be logged later).
    const unlogged = marked.filter((i) => marks[i.id] === 'defect' && !logged[i.id]?.length && base.marks[i.id] !== 'defect' && !openOn[i.id]?.length);
    const unloggedKey = unlogged.map((i) => i.code).join(', ');
    if (unlogged.length > 0 && warnedUnlogged !== unloggedKey) {
      setWarnedUnlogged(unloggedKey);
      setError(
        `${unlogged.length === 1 ? 'This item is' : 'These items are'} marked Defect with no finding logged: ${unloggedKey}. ` +
          `${Press} “Log finding” on each, or ${press} Save again to save the check without them.`,
      );
      return;
    }
    setSaving(to);
    const sent = marked.map((i) => {
      const t = (texts[i.id] ?? '').trim();
      return { catalogueItemId: i.id, mark: marks[i.id]!, measuredText: i.measuredRule && t ? t : undefined };
    });
    try {
      const walkId = await ensureWalk(job.id, unit.levelId, userId, queryClient);
      await record.mutateAsync(recordCheckWrite(job.id, unit.id, { walkId, complete: marked.length === items.length, items: sent }, unit.tag));
      done.current = true;
      clearCheckDraft(draftKey);
      const target = to === 'next' ? next?.next : null;
      router.push(target ? links.unitCheck(job.id, target.id, unit.tag) : links.levelWalk(job.id, unit.levelId, unit.tag));
    } catch (err) {
      if (err instanceof ApiError && err.status === 409 && err.fields) {
        // The server names the refused items by their place in the request (items.<n>...).
        const onItems: Record<string, string> = {};
        for (const [field, message] of Object.entries(err.fields)) {
          const at = /^items\.(\d+)/.exec(field);
          const id = at ? sent[Number(at[1])]?.catalogueItemId : undefined;
          if (id) onItems[id] = message;
        }
        setItemErrors(onItems);
        const first = Object.keys(onItems)[0];
        if (first) scrollIntoView(rows.current[first]);
      }
      setError(err instanceof ApiError ? err.message : 'That did not save. Try again.');
    } finally {
      setSaving(null);
    }
  }

  if (mode.kind === 'finding') {
    const item = mode.item;
    const back = () => {
      setMode({ kind: 'check' });
      if (item) setScrollTo(item.id);
    };
    return (
      <CheckFrame scrollRef={scrollRef}>
        {/* One line: the form starts at once, its "Log finding" a short scroll away. */}
        <AppText variant="label" muted testID="unit-check-tag">
          {unit.tag}
        </AppText>
        <FindingForm
          job={job}
          target={{ unitId: unit.id, levelId: unit.levelId, spaceId: unit.spaceId, label: `Unit ${unit.tag}` }}
          item={item}
          unitKind={unit.kind}
          measuredText={item ? texts[item.id] : undefined}
          walkId={mode.walkId}
          unitCheckId={null}
          resolve={resolve}
          onCancel={back}
          draftKey={findingDraftKey(userId, job.id, unit.id, item?.id ?? null)}
          somethingElse={!item}
          onLogged={(finding) => {
            if (finding.code === OTHER_DEFECT_CODE) {
              // Not an item of this checklist: nothing to mark; the confirmation names it instead.
              setConfirmation({ itemId: '', text: `Finding ${finding.label} “${finding.title}” logged.` });
              setMode({ kind: 'check' });
              return;
            }
            const id = item?.id ?? finding.catalogueItemId;
            if (!item) setMarks((now) => ({ ...now, [id]: 'defect' }));
            setLogged((now) => ({ ...now, [id]: [...(now[id] ?? []), finding.label] }));
            const code = item?.code ?? items.find((i) => i.id === id)?.code ?? '';
            setConfirmation({ itemId: id, text: `Finding ${finding.label} logged on ${code}. Its mark stays Defect.` });
            setMode({ kind: 'check' });
            setScrollTo(id);
          }}
        />
      </CheckFrame>
    );
  }

  const bar =
    canCheck && items.length > 0 && !offer ? (
      <View style={styles.bar} testID="unit-check-bar">
        <View style={styles.barInner}>
          {confirmation ? (
            <View style={styles.confirm} role="status" testID="unit-check-confirmation">
              <Pressable
                accessibilityRole="button"
                aria-label={confirmation.itemId ? `${confirmation.text} Show the item` : confirmation.text}
                onPress={() => scrollIntoView(rows.current[confirmation.itemId])}
                style={styles.confirmText}
              >
                <AppText variant="small" style={{ color: colors.good }}>
                  <AppText aria-hidden style={{ color: colors.good }}>
                    ✓{' '}
                  </AppText>
                  {confirmation.text}
                </AppText>
              </Pressable>
              <Pressable accessibilityRole="button" aria-label="Close the confirmation" testID="unit-check-confirmation-close" onPress={() => setConfirmation(null)} style={styles.close}>
                <AppText variant="label">✕</AppText>
              </Pressable>
            </View>
          ) : null}
          {error ? (
            <Notice tone="error" testID="unit-check-error">
              {error}
            </Notice>
          ) : null}
          {allOkLeft && (allOkLeft.measured || allOkLeft.open) ? (
            <AppText variant="small" testID="unit-check-all-ok-left">
              {`Marked ${allOkLeft.marked} OK. Left for you: ${[
                allOkLeft.measured ? `${allOkLeft.measured} measured or yes/no item${allOkLeft.measured === 1 ? '' : 's'}` : '',
                allOkLeft.open ? `${allOkLeft.open} with an open finding` : '',
              ]
                .filter(Boolean)
                .join(', ')}.`}
            </AppText>
          ) : null}
          <AppText variant="label" testID="unit-check-progress">
            {markedCount} of {items.length} marked
            {defects ? ` · ${defects} defect${defects === 1 ? '' : 's'}` : ''}
          </AppText>
          <View style={styles.progress} role="progressbar" aria-valuemin={0} aria-valuemax={items.length} aria-valuenow={markedCount} accessibilityLabel="Items marked">
            <View style={[styles.progressFill, { width: `${items.length ? Math.round((markedCount / items.length) * 100) : 0}%` }]} />
          </View>
          {next ? (
            <AppText variant="small" muted testID="unit-check-next" numberOfLines={1}>
              {next.next ? `Next ${next.next.tag} · ${next.left} left on ${unit.levelName}` : `The last unit left on ${unit.levelName}`}
            </AppText>
          ) : null}
          <View style={styles.actions}>
            <Button
              label={restOk.length ? `All OK for the rest (${restOk.length})` : 'All OK for the rest'}
              tone="secondary"
              testID="unit-check-all-ok"
              disabled={restOk.length === 0}
              onPress={allOkForTheRest}
              style={styles.action}
            />
            <Button
              label={next && !next.next ? 'Save, level done' : 'Save and next unit'}
              testID="unit-check-save-next"
              busy={saving === 'next'}
              disabled={saving !== null}
              onPress={() => void save('next')}
              style={styles.action}
            />
          </View>
        </View>
      </View>
    ) : null;

  return (
    <CheckFrame bar={bar} scrollRef={scrollRef}>
      <Header job={job} unit={unit} checks={checks} where={where} onBack={() => void leave()} />
      <UnitWaiting jobId={job.id} unitId={unit.id} testID="unit-check-waiting" />
      {saved ? (
        <Notice tone="success" testID="unit-check-saved">
          {savedWords}
        </Notice>
      ) : null}
      {offer ? (
        <Card testID="unit-check-draft-offer">
          <AppText variant="heading" role="heading" aria-level={2} testID="unit-check-draft-question">
            {`Continue the check of ${offer.data.unitTag} from ${draftTime(offer.savedAt, job.timeZone)}?`}
          </AppText>
          <AppText testID="unit-check-draft-summary">{draftSummary(offer.data, base)}</AppText>
          {offer.data.baseCheckId !== (currentCheck?.id ?? null) ? (
            <Notice tone="caution">The unit has been checked again since. Continuing puts these marks over the newer check.</Notice>
          ) : null}
          <View style={styles.offerButtons}>
            <Button label="Continue" testID="unit-check-draft-continue" onPress={continueDraft} style={styles.action} />
            <Button label="Discard" tone="secondary" testID="unit-check-draft-discard" onPress={discardDraft} style={styles.action} />
          </View>
        </Card>
      ) : items.length === 0 ? (
        <EmptyState
          title="Nothing to check for this kind"
          body={`The job's defect catalogue has no items for ${unitKindLabel(unit.kind)}. A GC manager can add them in set-up.`}
          testID="unit-check-empty"
        />
      ) : (
        <>
          {!canCheck ? <Notice tone="info">Only inspectors and GC managers record unit checks. You can read the items here.</Notice> : null}
          <View style={styles.tools}>
            <TextField
              label="Find an item"
              testID="unit-check-search"
              value={query}
              onChangeText={setQuery}
              placeholder="Code or words, e.g. DR-03, pump"
              autoCapitalize="none"
              autoCorrect={false}
              compact
            />
            <ScrollView horizontal contentContainerStyle={styles.jump} testID="unit-check-jump" accessibilityLabel="Sections">
              {groups.map((g) => {
                const doneIn = g.items.filter((i) => marks[i.id]).length;
                const shown = `${SHORT_GROUP[g.key] ?? g.label} ${doneIn}/${g.items.length}`;
                return (
                  <Pressable
                    key={g.key}
                    accessibilityRole="button"
                    // Starts with what the chip shows, so a speech user can say it.
                    aria-label={`${shown}: go to ${g.label}, ${doneIn} of ${g.items.length} marked`}
                    testID={`unit-check-jump-${g.key}`}
                    onPress={() => scrollIntoView(sections.current[g.key], 'start')}
                    style={[styles.chip, doneIn === g.items.length ? styles.chipDone : null]}
                  >
                    <AppText variant="label">{shown}</AppText>
                  </Pressable>
                );
              })}
            </ScrollView>
          </View>
          {groups.length === 0 ? (
            <View style={styles.footer}>
              <AppText muted testID="unit-check-search-none">
                No item matches “{query.trim()}”.
              </AppText>
              {canCheck ? (
                <Button label={SOMETHING_ELSE.action} tone="secondary" testID="unit-check-search-other" busy={opening === 'other'} onPress={() => void openFinding()} />
              ) : null}
            </View>
          ) : null}
          {groups.map((g) => (
            <View key={g.key} ref={(n) => { sections.current[g.key] = n; }} style={styles.group} testID={`check-group-${g.key}`}>
              <AppText variant="heading" role="heading" aria-level={2} style={styles.groupTitle}>
                {g.label}
              </AppText>
              {g.items.map((item) => (
                <CheckItemRow
                  key={item.id}
                  ref={(n) => {
                    rows.current[item.id] = n;
                  }}
                  item={item}
                  mark={marks[item.id]}
                  onMark={(m) => setMark(item.id, m)}
                  measuredText={texts[item.id] ?? ''}
                  onMeasured={(text, view) => {
                    setTexts((now) => ({ ...now, [item.id]: text }));
                    // The measurement answers the item: a fail proposes the defect, a pass OK (unless marked already).
                    if (view.kind === 'result' && view.result.status === 'fail') setMark(item.id, 'defect');
                    else if (view.kind === 'result' && view.result.status === 'pass' && !marks[item.id] && !openOn[item.id]?.length) setMark(item.id, 'ok');
                  }}
                  resolve={resolve}
                  system={job.unitSystem}
                  logged={logged[item.id] ?? []}
                  unresolved={(openOn[item.id] ?? []).filter((l) => !(logged[item.id] ?? []).includes(l))}
                  error={itemErrors[item.id]}
                  onLogFinding={() => void openFinding(item)}
                  readOnly={!canCheck}
                />
              ))}
            </View>
          ))}
          {canCheck ? (
            <View style={styles.footer}>
              <Button
                label={rest.length === 0 ? 'Save and back to the level' : `Save (${rest.length} not marked) and back to the level`}
                tone="secondary"
                testID="unit-check-save"
                busy={saving === 'level'}
                disabled={saving !== null}
                onPress={() => void save('level')}
              />
              <Button
                label={SOMETHING_ELSE.action}
                tone="quiet"
                testID="unit-check-other-finding"
                busy={opening === 'other'}
                onPress={() => void openFinding()}
              />
            </View>
          ) : null}
        </>
      )}
    </CheckFrame>
  );
}

function draftSummary(d: CheckDraft, base: { marks: Record<string, CheckMark>; texts: Record<string, string> }): string {
  const marks = Object.keys(d.marks).filter((k) => d.marks[k] !== base.marks[k]).length;
  const values = Object.keys(d.texts).filter((k) => (d.texts[k] ?? '').trim() && d.texts[k] !== base.texts[k]).length;
  const findings = Object.values(d.logged).reduce((n, l) => n + l.length, 0);
  const parts = [
    `${marks} mark${marks === 1 ? '' : 's'}`,
    `${values} measured value${values === 1 ? '' : 's'}`,
    ...(findings ? [`${findings} finding${findings === 1 ? '' : 's'} logged`] : []),
    ...(d.openFinding ? ['a finding being written'] : []),
  ];
  return `Kept on this phone, not saved yet: ${parts.join(', ')}.`;
}

function Header({
  job,
  unit,
  checks,
  where,
  onBack,
}: {
  job: JobDetail;
  unit: UnitDto;
  checks: UnitChecksResponse;
  where: string;
  onBack: () => void;
}) {
  const last = checks.current;
  return (
    <View style={styles.head}>
      <Pressable accessibilityRole="link" onPress={onBack} style={styles.back} testID="unit-check-back">
        <AppText variant="label" style={{ color: colors.spruce }}>
          ← {unit.levelName}: all units
        </AppText>
      </Pressable>
      <AppText variant="display" role="heading" testID="unit-check-tag">
        {unit.tag}
      </AppText>
      <AppText muted>
        {unitKindLabel(unit.kind)}
        {unit.modelName ? ` · ${unit.modelName}` : ''}
        {where ? ` · ${where}` : ''}
      </AppText>
      <PlanPinLink jobId={job.id} levelId={unit.levelId} kind="unit" id={unit.id} pinned={unit.pinX !== null} canPlace={job.role === 'gc_manager'} testID="unit-plan-link" />
      <UnitStateBadge state={checks.unit.state} openFindings={checks.unit.openFindings} worstSeverity={checks.unit.worstSeverity} testID="unit-check-state" />
      {/* The unit's whole history on paper: checks, findings, fixes and tests. */}
      <ExportLink href={reportUrls.unitSheetPdf(job.id, unit.id)} label={`Unit sheet for ${unit.tag} (PDF)`} testID="unit-sheet" />
      {last ? (
        <AppText variant="small" muted testID="unit-check-last">
          {`Last checked ${formatWhen(last.checkedAt, job.timeZone)} by ${last.checkedBy.name}${last.complete ? '' : ' (not finished)'}. Its marks are filled in below.`}
        </AppText>
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({
  frame: { flex: 1, backgroundColor: colors.paper },
  scroll: { flex: 1 },
  content: { paddingHorizontal: space.lg, paddingTop: space.lg, paddingBottom: space.xl, alignItems: 'center' },
  column: { width: '100%', maxWidth: 640, gap: space.md },
  head: { gap: space.xs },
  back: { alignSelf: 'flex-start', minHeight: touchTarget, justifyContent: 'center' },
  tools: { gap: space.sm },
  jump: { gap: space.sm, paddingVertical: 2 },
  chip: choiceChip,
  chipDone: { borderColor: colors.good, backgroundColor: colors.goodSoft },
  group: { gap: space.sm },
  groupTitle: { paddingTop: space.sm },
  footer: { gap: space.md, paddingBottom: space.md },
  offerButtons: { flexDirection: 'row', gap: space.sm },
  bar: {
    borderTopWidth: 1,
    borderTopColor: colors.line,
    backgroundColor: colors.surface,
    paddingHorizontal: space.lg,
    paddingTop: space.sm,
    paddingBottom: space.md,
    alignItems: 'center',
  },
  barInner: { width: '100%', maxWidth: 640, gap: space.sm },
  confirm: { flexDirection: 'row', alignItems: 'center', backgroundColor: colors.goodSoft, borderRadius: radius.md, borderLeftWidth: 4, borderLeftColor: colors.good },
  confirmText: { flex: 1, minHeight: touchTarget, justifyContent: 'center', paddingHorizontal: space.sm },
  close: { minWidth: touchTarget, minHeight: touchTarget, alignItems: 'center', justifyContent: 'center' },
  progress: { height: 6, borderRadius: 3, backgroundColor: colors.spruceSoft, overflow: 'hidden' },
  progressFill: { height: 6, backgroundColor: colors.spruce },
  actions: { flexDirection: 'row', gap: space.sm },
  action: { flex: 1, paddingHorizontal: space.sm },
});
