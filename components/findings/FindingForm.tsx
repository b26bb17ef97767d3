import { useMemo, useState } from 'react';
import { StyleSheet, View } from 'react-native';
import type { LimitResolver } from '../../shared/calc/rules';
import { CATALOGUE_GROUPS } from '../../shared/catalogue/types';
import { createFindingSchema, type CreateFindingInput, type FindingDetail } from '../../shared/schemas/findings';
import type { CatalogueItemDto, JobDetail } from '../../shared/schemas/setup';
import { SEVERITY_LABELS, TRADES, type Severity, type UnitKindKey } from '../../shared/words';
import { ApiError } from '../api/client';
import type { Write } from '../api/mutations';
import { useCatalogueQuery } from '../queries/catalogue';
import { useJobCompaniesQuery } from '../queries/companies';
import { createFindingWrite, useCreateFindingMutation } from '../queries/findings';
import { space } from '../theme';
import { AppText } from '../ui/AppText';
import { Button } from '../ui/Button';
import { Card } from '../ui/Card';
import { Notice } from '../ui/Notice';
import { Select } from '../ui/Select';
import { ErrorState, LoadingState } from '../ui/States';
import { TextField } from '../ui/TextField';
import { ItemCaution } from '../walk/ItemCaution';
import { MeasuredField } from '../walk/MeasuredField';
import { CameraCapture } from './CameraCapture';
import { addDays, formatDay, suggestCompany, todayIn } from './due';
import { PhotoPicker } from './PhotoPicker';
import type { PickedPhoto } from './PhotoPicker.types';
import { PhotoStrip } from './PhotoStrip';
import { SeverityPicker } from './SeverityPicker';

/** At most this many photos per finding (the server's limit). */
export const MAX_PHOTOS = 10;

export interface FindingTarget {
  unitId?: string | null;
  spaceId?: string | null;
  levelId?: string | null;
  /** "Unit IU-3-07", "Space Corridor 3", "Level 3". */
  label: string;
}

export interface FindingFormProps {
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
  onLogged: (finding: FindingDetail) => void;
  onCancel?: () => void;
  testID?: string;
}

const TRADE_LABEL: Record<string, string> = Object.fromEntries(TRADES.map((t) => [t.key, t.label]));

/**
 * Log a finding: prefilled from the defect type (severity, the company whose trade fits, due date
 * from the job's per-severity policy), with note, measured value and photos. A common defect is
 * logged with three taps plus the photo.
 */
export function FindingForm(props: FindingFormProps) {
  const { job, item, unitKind, testID = 'finding-form' } = props;
  const catalogue = useCatalogueQuery(job.id, { unitKind });
  const companies = useJobCompaniesQuery(job.id);
  if (companies.isPending || (!item && catalogue.isPending)) return <LoadingState label="Loading the form…" testID={`${testID}-loading`} />;
  if (companies.isError) return <ErrorState message={companies.error.message} onRetry={() => companies.refetch()} testID={`${testID}-error`} />;
  if (!item && catalogue.isError) return <ErrorState message={catalogue.error.message} onRetry={() => catalogue.refetch()} testID={`${testID}-error`} />;
  return <FindingFormBody {...props} items={item ? [item] : (catalogue.data ?? [])} companies={companies.data} />;
}

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
  testID = 'finding-form',
}: FindingFormProps & { items: readonly CatalogueItemDto[]; companies: NonNullable<ReturnType<typeof useJobCompaniesQuery>['data']> }) {
  const [itemId, setItemId] = useState(fixedItem?.id ?? '');
  const item = fixedItem ?? items.find((i) => i.id === itemId);
  const [severity, setSeverity] = useState<Severity>(fixedItem?.defaultSeverity ?? 'major');
  const suggested = suggestCompany(companies, item?.trade);
  const [companyId, setCompanyId] = useState<string>(suggested?.id ?? '');
  const [dueEdited, setDueEdited] = useState<string | null>(null);
  const [note, setNote] = useState('');
  const [measured, setMeasured] = useState(initialMeasured ?? '');
  const [photos, setPhotos] = useState<PickedPhoto[]>([]);
  const [errors, setErrors] = useState<Record<string, string>>({});
  const [formError, setFormError] = useState<string | null>(null);
  const [write, setWrite] = useState<Write | null>(null);
  const create = useCreateFindingMutation(job.id);

  const today = todayIn(job.timeZone);
  const policyDays = job.severityDueDays[severity];
  const dueOn = dueEdited ?? addDays(today, policyDays);

  const groupLabel = useMemo(() => Object.fromEntries(CATALOGUE_GROUPS.map((g) => [g.key, g.label])), []);
  const itemOptions = useMemo(
    () =>
      [...items]
        .sort((a, b) => a.code.localeCompare(b.code))
        .map((i) => ({ value: i.id, label: `${i.code} · ${i.title} (${groupLabel[i.group] ?? i.group})` })),
    [items, groupLabel],
  );

  function chooseItem(id: string) {
    setItemId(id);
    const next = items.find((i) => i.id === id);
    if (next) {
      setSeverity(next.defaultSeverity);
      const s = suggestCompany(companies, next.trade);
      if (s) setCompanyId(s.id);
    }
  }

  function addPhotos(more: PickedPhoto[]) {
    setPhotos((now) => {
      const room = MAX_PHOTOS - now.length;
      if (more.length > room) setFormError(`At most ${MAX_PHOTOS} photos per finding.`);
      return [...now, ...more.slice(0, Math.max(room, 0))];
    });
  }

  function submit() {
    setFormError(null);
    const input: CreateFindingInput = {
      catalogueItemId: item?.id ?? '',
      unitId: target.unitId ?? undefined,
      spaceId: target.unitId ? undefined : (target.spaceId ?? undefined),
      levelId: target.unitId || target.spaceId ? undefined : (target.levelId ?? undefined),
      severity,
      companyId: companyId || undefined,
      dueOn,
      note: note.trim() || undefined,
      measuredText: item?.measuredRule && measured.trim() ? measured.trim() : undefined,
      walkId: walkId ?? undefined,
      unitCheckId: unitCheckId ?? undefined,
    };
    const parsed = createFindingSchema.safeParse(input);
    if (!parsed.success) {
      const next: Record<string, string> = {};
      for (const issue of parsed.error.issues) {
        const key = String(issue.path[0] ?? 'form');
        if (!next[key]) next[key] = issue.message;
      }
      setErrors(next);
      setFormError('Check the fields marked below.');
      return;
    }
    setErrors({});
    // One write per press; a retry after a failure re-sends the same write (same Idempotency-Key).
    const w = write ?? createFindingWrite(job.id, input, photos);
    setWrite(w);
    create.mutate(w, {
      onSuccess: (finding) => {
        setWrite(null);
        onLogged(finding);
      },
      onError: (err) => {
        if (err instanceof ApiError) {
          setErrors(err.fields);
          setFormError(err.message);
          // A refusal (4xx) will not change on retry: the next press builds a fresh write.
          if (err.status >= 400 && err.status < 500) setWrite(null);
        } else setFormError('That did not save. Try again.');
      },
    });
  }

  // Any change after a failed send makes a new write (the old key belongs to other content).
  const edit = <T,>(set: (v: T) => void) => (v: T) => {
    setWrite(null);
    set(v);
  };

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
        ) : (
          <Select
            label="Defect type"
            testID={`${testID}-item`}
            value={itemId}
            placeholder="Choose the defect type"
            options={itemOptions}
            onChange={edit(chooseItem)}
            error={errors.catalogueItemId}
            compact
          />
        )}
        {item ? (
          <AppText variant="small" muted>
            {item.description}
          </AppText>
        ) : null}
      </Card>
      {item?.caution ? <ItemCaution text={item.caution} initiallyOpen testID={`${testID}-caution`} /> : null}

      <SeverityPicker value={severity} onChange={edit(setSeverity)} testID={`${testID}-severity`} />
      {errors.severity ? <AppText style={styles.error}>{errors.severity}</AppText> : null}

      <Select
        label="Responsible company"
        testID={`${testID}-company`}
        value={companyId}
        placeholder="Choose a company"
        options={[...companies]
          .sort((a, b) => a.name.localeCompare(b.name))
          .map((c) => ({ value: c.id, label: c.id === suggested?.id ? `${c.name} (suggested)` : c.name }))}
        onChange={edit(setCompanyId)}
        error={errors.companyId}
        hint={
          item
            ? suggested
              ? `Suggested from the trade: ${TRADE_LABEL[item.trade] ?? item.trade}.`
              : `No company on the job covers ${TRADE_LABEL[item.trade] ?? item.trade}: choose one.`
            : undefined
        }
        compact
      />

      <TextField
        label="Due date"
        testID={`${testID}-due`}
        value={dueOn}
        onChangeText={edit((t: string) => setDueEdited(t))}
        error={errors.dueOn}
        hint={`${formatDay(/^\d{4}-\d{2}-\d{2}$/.test(dueOn) ? dueOn : today)} · job policy: ${SEVERITY_LABELS[severity].toLowerCase()} findings are due in ${policyDays} day${policyDays === 1 ? '' : 's'}.`}
        inputMode="numeric"
        compact
      />

      {item?.measuredRule && resolve ? (
        <MeasuredField
          rule={item.measuredRule}
          text={measured}
          onChangeText={edit((t: string) => setMeasured(t))}
          resolve={resolve}
          system={job.unitSystem}
          testID={`${testID}-measured`}
        />
      ) : null}
      {errors.measuredText ? <AppText style={styles.error}>{errors.measuredText}</AppText> : null}

      <TextField
        label="Note (optional)"
        testID={`${testID}-note`}
        value={note}
        onChangeText={edit(setNote)}
        error={errors.note}
        placeholder="Where exactly, what you saw"
        multiline
        numberOfLines={3}
        style={styles.note}
        compact
      />

      <View style={styles.photos}>
        <AppText variant="label">
          Photos ({photos.length} of at most {MAX_PHOTOS})
        </AppText>
        <PhotoStrip
          testID={`${testID}-photos`}
          photos={photos.map((p, i) => ({ key: p.key, thumbUri: p.uri, fullUri: p.uri, label: `Photo ${i + 1}` }))}
          onRemove={(key) => {
            setWrite(null);
            setPhotos((now) => now.filter((p) => p.key !== key));
          }}
        />
        <PhotoPicker
          label="Add photos from files"
          testID={`${testID}-files`}
          disabled={photos.length >= MAX_PHOTOS}
          onPick={(p) => {
            setWrite(null);
            addPhotos(p);
          }}
          onError={setFormError}
        />
        <CameraCapture
          testID={`${testID}-camera`}
          disabled={photos.length >= MAX_PHOTOS}
          onPhoto={(p) => {
            setWrite(null);
            addPhotos([p]);
          }}
        />
      </View>

      {formError ? (
        <Notice tone="error" testID={`${testID}-error`}>
          {formError}
        </Notice>
      ) : null}
      <Button label={photos.length ? `Log finding with ${photos.length} photo${photos.length === 1 ? '' : 's'}` : 'Log finding'} testID={`${testID}-submit`} busy={create.isPending} onPress={submit} />
      {onCancel ? <Button label="Cancel" tone="quiet" testID={`${testID}-cancel`} onPress={onCancel} /> : null}
    </View>
  );
}

const styles = StyleSheet.create({
  form: { gap: space.lg },
  photos: { gap: space.sm },
  note: { minHeight: 88, paddingTop: space.sm, textAlignVertical: 'top' },
  error: { color: '#A4341F' },
});
