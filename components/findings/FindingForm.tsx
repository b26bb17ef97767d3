import { MAX_PHOTOS_PER_REQUEST } from '../../shared/rules/photos';
import { zodResolver } from '@hookform/resolvers/zod';
import { useEffect, useMemo, useRef, useState } from 'react';
import { useForm } from 'react-hook-form';
import { StyleSheet, View } from 'react-native';
import type { LimitResolver } from '../../shared/calc/rules';
import { CATALOGUE_GROUPS } from '../../shared/catalogue/types';
import { createFindingSchema, DEFECT_TITLE_LIMIT, NOTE_LIMIT, type CreateFindingInput, type CreateFindingParsed } from '../../shared/schemas/findings';
import type { CatalogueItemDto, JobCompanyDto, JobDetail } from '../../shared/schemas/setup';
import { SEVERITY_LABELS, SOMETHING_ELSE, TRADES, type Severity, type TradeKey, type UnitKindKey } from '../../shared/words';
import { ApiError } from '../api/client';
import type { Write } from '../api/mutations';
import { applyApiError } from '../auth/formErrors';
import { useFindingDraft, useKeepFindingDraft } from '../drafts/findingDraft';
import { keepNow } from '../outbox';
import { useCatalogueQuery } from '../queries/catalogue';
import { useJobCompaniesQuery } from '../queries/companies';
import { createFindingWrite, useCreateFindingMutation, type LoggedFinding } from '../queries/findings';
import { space } from '../theme';
import { AppText } from '../ui/AppText';
import { Button } from '../ui/Button';
import { Card } from '../ui/Card';
import { FormBanner } from '../ui/FormBanner';
import { FormMeasured, FormPhotos, FormSelect, FormSeverity, FormText, withFormOnly } from '../ui/FormFields';
import { ErrorState, LoadingState } from '../ui/States';
import { ItemCaution } from '../walk/ItemCaution';
import { dueOnProblem } from '../../shared/rules/pastDue';
import { BackdateChoice, backdatedFlag } from './BackdateChoice';
import { noCompanyForTrade } from '../../shared/rules/suggestedCompany';
import { addDays, formatDay, suggestCompany, todayIn } from './due';
import type { PickedPhoto } from './PhotoPicker.types';

/** At most this many photos per finding (the server's limit). */
/** The server's own limit per request (shared/rules/photos). */
export const MAX_PHOTOS = MAX_PHOTOS_PER_REQUEST;

export interface FindingTarget {
  unitId?: string | null;
  spaceId?: string | null;
  levelId?: string | null;
  /** "Unit IU-3-07", "Space Corridor 3", "Level 3". */
  label: string;
}

export interface FindingFormProps {
  /**
   * The defect types (of the unit's kind) and the job's companies when the screen already asked for
   * them beside its own reads (one round trip less on a phone); otherwise the form asks.
   */
  lists?: { items: CatalogueItemDto[]; companies: JobCompanyDto[] };
  job: JobDetail;
  target: FindingTarget;
  /** The defect type, when the form opens from a unit check's item. */
  item?: CatalogueItemDto;
  /** Narrows the defect types offered (a unit's kind). */
  unitKind?: UnitKindKey;
  measuredText?: string;
  walkId?: string | null;
  unitCheckId?: string | null;
  /** Limits of the unit (its model, the job, the codes) for a measured defect type. */
  resolve?: LimitResolver;
  /** The finding as the server holds it, or (no signal) the one kept on the phone, waiting to send. */
  onLogged: (finding: LoggedFinding) => void;
  onCancel?: () => void;
  /** Keeps the half-filled form on the phone under this key (components/drafts), restored when it opens again. */
  draftKey?: string;
  /** Opens on "Something else": a defect the catalogue lacks, named in the inspector's words (title). */
  somethingElse?: boolean;
  testID?: string;
}

const TRADE_LABEL: Record<string, string> = Object.fromEntries(TRADES.map((t) => [t.key, t.label]));

/**
 * Log a finding: prefilled from the defect type (severity, the company whose trade fits, due date
 * from the job's per-severity policy), with note, measured value and photos. A common defect is
 * logged with three taps plus the photo.
 */
export function FindingForm(props: FindingFormProps) {
  const { job, item, unitKind, lists, testID = 'finding-form' } = props;
  const catalogue = useCatalogueQuery(job.id, { unitKind }, { enabled: !lists });
  const companies = useJobCompaniesQuery(job.id, { enabled: !lists });
  if (lists) return <FindingFormBody {...props} items={item ? [item] : lists.items} companies={lists.companies} />;
  if (companies.isPending || (!item && catalogue.isPending)) return <LoadingState label="Loading the form…" testID={`${testID}-loading`} />;
  if (companies.isLoadingError) return <ErrorState message={companies.error.message} onRetry={() => companies.refetch()} testID={`${testID}-error`} />;
  if (!item && catalogue.isLoadingError) return <ErrorState message={catalogue.error.message} onRetry={() => catalogue.refetch()} testID={`${testID}-error`} />;
  return <FindingFormBody {...props} items={item ? [item] : (catalogue.data ?? [])} companies={companies.data} />;
}

type FindingFormValues = CreateFindingInput & { photos: PickedPhoto[] };
type FindingFormParsed = CreateFindingParsed & { photos: PickedPhoto[] };

/** The request's fields shown on the form (server field errors land on these). */
const FIELDS = ['catalogueItemId', 'title', 'trade', 'severity', 'companyId', 'dueOn', 'measuredText', 'note'] as const;

const resolver = withFormOnly<CreateFindingInput, unknown, CreateFindingParsed, { photos: PickedPhoto[] }>(zodResolver(createFindingSchema), {
  // Photos are optional on a finding; the field itself refuses more than MAX_PHOTOS.
  photos: () => undefined,
});

function FindingFormBody({
  job,
  target,
  item: fixedItem,
  measuredText: initialMeasured,
  walkId,
  unitCheckId,
  resolve,
  onLogged,
  onCancel,
  items,
  companies,
  draftKey,
  somethingElse,
  testID = 'finding-form',
}: FindingFormProps & { items: readonly CatalogueItemDto[]; companies: NonNullable<ReturnType<typeof useJobCompaniesQuery>['data']> }) {
  const today = todayIn(job.timeZone);
  const policyDue = (s: Severity) => addDays(today, job.severityDueDays[s]);
  const kept = useFindingDraft(draftKey);
  // A GC manager's explicit "back-date on purpose" (a date before today is refused otherwise).
  const [backdate, setBackdate] = useState(false);
  const initialSeverity: Severity = kept.initial.severity ?? fixedItem?.defaultSeverity ?? 'major';
  // "Something else" holds a title and a trade instead of a defect type (a kept draft says which it was).
  const [other, setOther] = useState<boolean>(!fixedItem && (kept.initial.title !== undefined || (Boolean(somethingElse) && !kept.initial.catalogueItemId)));
  const { control, handleSubmit, setError, setValue, watch, formState } = useForm<FindingFormValues, unknown, FindingFormParsed>({
    resolver,
    defaultValues: {
      catalogueItemId: fixedItem?.id,
      ...(other ? { title: '', trade: 'general' as TradeKey } : {}),
      unitId: target.unitId ?? undefined,
      spaceId: target.unitId ? undefined : (target.spaceId ?? undefined),
      levelId: target.unitId || target.spaceId ? undefined : (target.levelId ?? undefined),
      severity: initialSeverity,
      companyId: suggestCompany(companies, fixedItem?.trade)?.id,
      dueOn: policyDue(initialSeverity),
      note: '',
      measuredText: initialMeasured?.trim() ? initialMeasured : null,
      walkId: walkId ?? undefined,
      unitCheckId: unitCheckId ?? undefined,
      photos: [],
      ...kept.initial,
    },
  });
  useKeepFindingDraft(kept, watch, (photos) => setValue('photos', photos));
  const create = useCreateFindingMutation(job.id);
  // One write per press; a retry after a failure re-sends the same write (same Idempotency-Key).
  const write = useRef<Write | null>(null);
  // Any change after a failed send makes a new write (the old key belongs to other content).
  useEffect(() => {
    const sub = watch(() => {
      write.current = null;
    });
    return () => sub.unsubscribe();
  }, [watch]);

  const [itemId, severity, dueOn, photoCount, otherTrade] = [watch('catalogueItemId'), watch('severity') ?? 'major', watch('dueOn') ?? '', watch('photos').length, watch('trade')];
  const item = other ? undefined : (fixedItem ?? items.find((i) => i.id === itemId));
  const trade = other ? otherTrade : item?.trade;
  const suggested = suggestCompany(companies, trade);
  const policyDays = job.severityDueDays[severity];
  // The due date follows the job's policy for the severity until someone types another one.
  const followsPolicy = dueOn === policyDue(severity);
  const revalidate = { shouldValidate: formState.isSubmitted };

  const groupLabel = useMemo(() => Object.fromEntries(CATALOGUE_GROUPS.map((g) => [g.key, g.label])), []);
  const itemOptions = useMemo(
    () =>
      [...items]
        .sort((a, b) => a.code.localeCompare(b.code))
        .map((i) => ({ value: i.id, label: `${i.code} · ${i.title} (${groupLabel[i.group] ?? i.group})` })),
    [items, groupLabel],
  );

  /** Between a defect type of the catalogue and "Something else": the body carries one or the other. */
  function chooseOther(next: boolean) {
    setOther(next);
    if (next) {
      setValue('catalogueItemId', undefined);
      setValue('title', '');
      setValue('trade', 'general');
      setValue('measuredText', null);
      tradeChosen('general');
    } else {
      setValue('title', undefined);
      setValue('trade', undefined);
    }
  }

  function tradeChosen(key: string) {
    const s = suggestCompany(companies, key);
    if (s) setValue('companyId', s.id, revalidate);
  }

  function severityChosen(next: Severity) {
    if (followsPolicy) setValue('dueOn', policyDue(next), revalidate);
  }

  function itemChosen(id: string) {
    const next = items.find((i) => i.id === id);
    if (!next) return;
    setValue('severity', next.defaultSeverity, revalidate);
    severityChosen(next.defaultSeverity);
    const s = suggestCompany(companies, next.trade);
    if (s) setValue('companyId', s.id, revalidate);
    if (!next.measuredRule) setValue('measuredText', null, revalidate);
  }

  // A press being kept on the phone: a second press meanwhile does nothing (the button is not busy yet).
  const keeping = useRef(false);
  const submit = handleSubmit(
    async ({ photos, ...values }) => {
      if (keeping.current) return;
      // The server refuses a date before today on the job's clock; say so at the field before sending.
      const problem = values.dueOn ? dueOnProblem({ dueOn: values.dueOn, backdated: backdate, role: job.role, today }) : null;
      if (problem) {
        setError('dueOn', { type: 'validate', message: problem.message });
        setError('root', { message: 'Check the fields marked below.' });
        return;
      }
      // No company chosen and none of the job's covers the trade: the server would refuse it, and
      // without signal that refusal would only come later, on the sync screen.
      if (!values.companyId && trade && companies.length > 0 && !suggested) {
        setError('companyId', { type: 'validate', message: noCompanyForTrade(trade) });
        setError('root', { message: 'Check the fields marked below.' });
        return;
      }
      const input: CreateFindingInput = {
        ...values,
        ...backdatedFlag(backdate, values.dueOn, today),
        note: values.note || undefined,
        measuredText: item?.measuredRule ? (values.measuredText ?? undefined) : undefined,
        ...(other ? { catalogueItemId: undefined } : { title: undefined, trade: undefined }),
      };
      const w = write.current ?? createFindingWrite(job.id, input, photos, target.label);
      write.current = w;
      // Kept on the phone first, before anything re-renders: saved means saved, and quickly.
      keeping.current = true;
      try {
        await keepNow(w);
      } finally {
        keeping.current = false;
      }
      create.mutate(w, {
        onSuccess: (finding) => {
          write.current = null;
          kept.clear();
          onLogged(finding);
        },
        onError: (err) => {
          applyApiError(err, setError, FIELDS, 'That did not save. Try again.');
          // A refusal (4xx) will not change on retry: the next press builds a fresh write.
          if (err instanceof ApiError && err.status >= 400 && err.status < 500) write.current = null;
        },
      });
    },
    () => setError('root', { message: 'Check the fields marked below.' }),
  );

  return (
    <View style={styles.form} testID={testID}>
      <Card>
        <AppText variant="small" muted>
          New finding · {target.label}
        </AppText>
        {fixedItem ? (
          <AppText variant="heading" testID={`${testID}-item`}>
            {fixedItem.code} · {fixedItem.title}
          </AppText>
        ) : other ? (
          <>
            <AppText variant="heading" testID={`${testID}-something-else`}>
              {SOMETHING_ELSE.label}
            </AppText>
            <FormText
              control={control}
              name="title"
              label={SOMETHING_ELSE.titleLabel}
              testID={`${testID}-title`}
              placeholder="e.g. Return grille hanging loose"
              limit={DEFECT_TITLE_LIMIT}
              hint="A few words, the same each time: findings with the same words count together as a recurring defect."
              compact
            />
            <FormSelect
              control={control}
              name="trade"
              label="Trade that usually fixes it"
              testID={`${testID}-trade`}
              options={TRADES.map((t) => ({ value: t.key, label: t.label }))}
              onChosen={tradeChosen}
              compact
            />
          </>
        ) : (
          <FormSelect
            control={control}
            name="catalogueItemId"
            label="Defect type"
            testID={`${testID}-item`}
            placeholder="Choose the defect type"
            options={itemOptions}
            onChosen={itemChosen}
            compact
          />
        )}
        {fixedItem ? null : (
          <Button
            label={other ? 'Choose a defect type from the catalogue instead' : SOMETHING_ELSE.action}
            tone="quiet"
            testID={`${testID}-${other ? 'catalogue' : 'other'}`}
            onPress={() => chooseOther(!other)}
          />
        )}
        {item ? (
          <AppText variant="small" muted>
            {item.description}
          </AppText>
        ) : null}
      </Card>
      {item?.caution ? <ItemCaution text={item.caution} initiallyOpen testID={`${testID}-caution`} /> : null}

      <FormSeverity control={control} name="severity" testID={`${testID}-severity`} onChosen={severityChosen} />

      <FormSelect
        control={control}
        name="companyId"
        label="Responsible company"
        testID={`${testID}-company`}
        placeholder="Choose a company"
        options={[...companies]
          .sort((a, b) => a.name.localeCompare(b.name))
          .map((c) => ({ value: c.id, label: c.id === suggested?.id ? `${c.name} (suggested)` : c.name }))}
        hint={
          trade
            ? suggested
              ? `Suggested from the trade: ${TRADE_LABEL[trade] ?? trade}.`
              : `No company on the job covers ${TRADE_LABEL[trade] ?? trade}: choose one.`
            : undefined
        }
        compact
      />

      <FormText
        control={control}
        name="dueOn"
        label="Due date"
        testID={`${testID}-due`}
        hint={`${formatDay(/^\d{4}-\d{2}-\d{2}$/.test(dueOn) ? dueOn : today)} · job policy: ${SEVERITY_LABELS[severity].toLowerCase()} findings are due in ${policyDays} day${policyDays === 1 ? '' : 's'}.`}
        inputMode="numeric"
        compact
      />
      <BackdateChoice dueOn={dueOn} today={today} role={job.role} value={backdate} onChange={setBackdate} testID={`${testID}-backdate`} />

      {item?.measuredRule && resolve ? (
        <FormMeasured control={control} name="measuredText" testID={`${testID}-measured`} rule={item.measuredRule} resolve={resolve} system={job.unitSystem} />
      ) : null}

      <FormText
        control={control}
        name="note"
        label="Note (optional)"
        testID={`${testID}-note`}
        placeholder="Where exactly, what you saw"
        limit={NOTE_LIMIT}
        multiline
        numberOfLines={3}
        style={styles.note}
        compact
      />

      <FormPhotos control={control} name="photos" label="Photos" testID={testID} max={MAX_PHOTOS} tooMany={`At most ${MAX_PHOTOS} photos per finding.`} />

      <FormBanner control={control} testID={`${testID}-error`} />
      <Button label={photoCount ? `Log finding with ${photoCount} photo${photoCount === 1 ? '' : 's'}` : 'Log finding'} testID={`${testID}-submit`} busy={create.isPending} onPress={submit} />
      {onCancel ? (
        <Button
          label="Cancel"
          tone="quiet"
          testID={`${testID}-cancel`}
          onPress={() => {
            kept.clear();
            onCancel();
          }}
        />
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({
  form: { gap: space.lg },
  note: { minHeight: 88, paddingTop: space.sm, textAlignVertical: 'top' },
});
