import { zodResolver } from '@hookform/resolvers/zod';
import { useState } from 'react';
import { useForm, type Resolver } from 'react-hook-form';
import { StyleSheet, View } from 'react-native';
import type { z } from 'zod';
import { CODE_LIMITS } from '../../shared/calc/limits';
import { HAZARDOUS_GROUPS } from '../../shared/catalogue';
import { CATALOGUE_GROUPS, CODE_CHECK_RULES, COMPARISONS, JOB_SETTINGS, MODEL_LIMITS, QUANTITY_KINDS, type CodeCheckKey, type LimitRef } from '../../shared/catalogue/types';
import {
  CATALOGUE_TEXT_LIMITS,
  createCatalogueItemSchema,
  updateCatalogueItemSchema,
  type CatalogueItemDto,
  type CreateCatalogueItemInput,
  type JobDetail,
  type UpdateCatalogueItemInput,
} from '../../shared/schemas/setup';
import { SEVERITIES, SEVERITY_LABELS, TRADES, UNIT_KINDS, unitKindLabel, type Severity, type TradeKey, type UnitKindKey } from '../../shared/words';
import { useCatalogueQuery, useCreateCatalogueItemMutation, useUpdateCatalogueItemMutation } from '../queries/catalogue';
import { colors, radius, severityColors, space } from '../theme';
import { AppText } from '../ui/AppText';
import { Badge } from '../ui/Badge';
import { Button } from '../ui/Button';
import { Card } from '../ui/Card';
import { Notice, SafetyCaution } from '../ui/Notice';
import { Select } from '../ui/Select';
import { EmptyState, ErrorState, LoadingState } from '../ui/States';
import { FormBanner } from '../ui/FormBanner';
import { FormChips, FormSegmented, FormSelect, FormText, preparedFor } from '../ui/FormFields';
import { useWide } from '../ui/useWide';
import { TRADE_LABEL } from './CompaniesScreen';
import { showServerErrors, writeErrorMessage } from './formErrors';
import { ruleWords } from './ruleWords';
import { SetupFrame, canEditSetup } from './SetupFrame';
import { KIND_LABEL } from './UnitsScreen';

const YES_NO = [
  { value: 'yes', label: 'Yes' },
  { value: 'no', label: 'No' },
] as const;
const NO_YES = [YES_NO[1], YES_NO[0]] as const;
const RULE_OR_NONE = [
  { value: 'no', label: 'None' },
  { value: 'yes', label: 'Measure a value' },
] as const;
const SHOWN_TYPES = [
  { value: 'active', label: 'Types in use' },
  { value: 'all', label: 'Also retired types' },
] as const;

export function CatalogueScreen({ jobId }: { jobId: string }) {
  return (
    <SetupFrame
      jobId={jobId}
      section="catalogue"
      title="Defect catalogue"
      intro="The defect types this job checks. It starts from Trimout's built-in catalogue; add your own, edit, or retire types you do not check."
      testID="catalogue-screen"
    >
      {(job) => <CatalogueBody job={job} />}
    </SetupFrame>
  );
}

function CatalogueBody({ job }: { job: JobDetail }) {
  const editor = canEditSetup(job);
  const [unitKind, setUnitKind] = useState<UnitKindKey | ''>('');
  const [includeRetired, setIncludeRetired] = useState(false);
  const [form, setForm] = useState<{ item?: CatalogueItemDto } | null>(null);
  const items = useCatalogueQuery(job.id, { unitKind: unitKind || undefined, includeRetired });

  return (
    <View style={styles.body}>
      <View style={styles.filters}>
        <View style={styles.filter}>
          <Select
            compact
            label="Unit kind"
            testID="catalogue-kind"
            value={unitKind}
            placeholder="All unit kinds"
            options={UNIT_KINDS.map((k) => ({ value: k.key, label: k.label }))}
            onChange={(v) => setUnitKind(v as UnitKindKey | '')}
          />
        </View>
        <View style={styles.filter}>
          <Select
            compact
            label="Show"
            testID="catalogue-retired"
            value={includeRetired ? 'all' : 'active'}
            options={SHOWN_TYPES}
            onChange={(v) => setIncludeRetired(v === 'all')}
          />
        </View>
        {editor && !form ? <Button testID="catalogue-add" label="Add a defect type" tone="secondary" onPress={() => setForm({})} /> : null}
      </View>
      {form && editor ? <CatalogueForm key={form.item?.id ?? 'new'} job={job} existing={form.item} onDone={() => setForm(null)} /> : null}
      {unitKind && items.isSuccess && items.data.length > 0 ? <KindSummary kind={unitKind} items={items.data} /> : null}
      {items.isPending ? (
        <LoadingState label="Loading the catalogue…" />
      ) : items.isError ? (
        <ErrorState message={items.error.message} onRetry={() => items.refetch()} />
      ) : items.data.length === 0 ? (
        <EmptyState
          title="No defect types"
          body={unitKind ? 'No defect type applies to this unit kind.' : 'This job has no defect types yet.'}
          testID="catalogue-empty"
        />
      ) : (
        <View style={styles.groups} testID="catalogue-list">
          {CATALOGUE_GROUPS.map((g) => {
            const inGroup = items.data.filter((i) => i.group === g.key);
            if (inGroup.length === 0) return null;
            return (
              <View key={g.key} style={styles.group} testID={`catalogue-group-${g.key}`}>
                <AppText variant="title" role="heading">
                  {g.label}{' '}
                  <AppText variant="body" muted>
                    ({inGroup.length})
                  </AppText>
                </AppText>
                {inGroup.map((item) => (
                  <CatalogueItemCard key={item.id} job={job} item={item} kind={unitKind || null} editor={editor} onEdit={() => setForm({ item })} />
                ))}
              </View>
            );
          })}
        </View>
      )}
    </View>
  );
}

/** What the picked kind is checked for: how many types, how many measured, how many its own. */
function KindSummary({ kind, items }: { kind: UnitKindKey; items: readonly CatalogueItemDto[] }) {
  const measured = items.filter((i) => i.measuredRule).length;
  const own = items.filter((i) => i.unitKinds.length === 1).length;
  const plural = (n: number, one: string, many: string) => `${n} ${n === 1 ? one : many}`;
  return (
    <View style={styles.summary} testID="catalogue-kind-summary">
      <AppText variant="heading">{unitKindLabel(kind)}</AppText>
      <AppText>
        {plural(items.length, 'check applies', 'checks apply')}: {measured} measured, {plural(own, 'check', 'checks')} for this kind only.
      </AppText>
    </View>
  );
}

function SeverityBadge({ severity }: { severity: Severity }) {
  const c = severityColors[severity];
  return (
    <View style={[styles.severity, { backgroundColor: c.bg }]}>
      <AppText variant="label" style={{ color: c.fg }}>
        {SEVERITY_LABELS[severity]}
      </AppText>
    </View>
  );
}

function CatalogueItemCard({
  job,
  item,
  kind,
  editor,
  onEdit,
}: {
  job: JobDetail;
  item: CatalogueItemDto;
  /** The kind the list is narrowed to, if any: a type only that kind has says so. */
  kind: UnitKindKey | null;
  editor: boolean;
  onEdit: () => void;
}) {
  const [open, setOpen] = useState(false);
  const [error, setError] = useState<string | null>(null);
  const update = useUpdateCatalogueItemMutation(job.id);
  const retired = item.retiredAt !== null;
  return (
    <View style={[styles.item, retired ? styles.retired : null]} testID={`catalogue-item-${item.code}`}>
      <View style={styles.itemHead}>
        <AppText variant="label" style={styles.code}>
          {item.code}
        </AppText>
        <View style={styles.grow}>
          <AppText variant="heading">{item.title}</AppText>
          <View style={styles.meta}>
            <SeverityBadge severity={item.defaultSeverity} />
            <Badge label={TRADE_LABEL[item.trade]} />
            {item.measuredRule ? <Badge label="Measured" tone="info" /> : null}
            {kind && item.unitKinds.length === 1 && item.unitKinds[0] === kind ? <Badge label="This kind only" tone="neutral" /> : null}
            {item.caution ? <Badge label="Caution" tone="warn" /> : null}
            {!item.builtin ? <Badge label="Added for this job" tone="neutral" /> : null}
            {retired ? <Badge label="Retired" tone="bad" /> : null}
          </View>
        </View>
        <Button label={open ? 'Less' : 'More'} tone="quiet" testID={`catalogue-more-${item.code}`} onPress={() => setOpen((o) => !o)} />
      </View>
      {open ? (
        <View style={styles.detail}>
          <AppText>{item.description}</AppText>
          <AppText variant="small" muted>
            Applies to: {item.unitKinds.map((k) => KIND_LABEL[k]).join(', ')}
            {item.needsCeilingAccess ? '. The fix needs access above the ceiling.' : '.'}
          </AppText>
          {item.measuredRule ? (
            <View>
              <AppText variant="label">Measured rule</AppText>
              <AppText testID={`catalogue-rule-${item.code}`}>{ruleWords(item.measuredRule, job.unitSystem)}</AppText>
            </View>
          ) : null}
          <View>
            <AppText variant="label">How to fix</AppText>
            <AppText>{item.fixGuidance}</AppText>
          </View>
          {item.caution ? <SafetyCaution text={item.caution} testID={`catalogue-caution-${item.code}`} /> : null}
          {error ? <Notice tone="error">{error}</Notice> : null}
          {editor ? (
            <View style={styles.actions}>
              <Button label="Edit" tone="secondary" aria-label={`Edit ${item.code} ${item.title}`} testID={`catalogue-edit-${item.code}`} onPress={onEdit} />
              <Button
                label={retired ? 'Bring back' : 'Retire'}
                aria-label={`${retired ? 'Bring back' : 'Retire'} ${item.code} ${item.title}`}
                tone="quiet"
                testID={`catalogue-retire-${item.code}`}
                busy={update.isPending}
                onPress={() => {
                  setError(null);
                  update.mutate({ item, input: { retired: !retired } }, { onError: (err) => setError(writeErrorMessage(err)) });
                }}
              />
            </View>
          ) : null}
        </View>
      ) : null}
    </View>
  );
}

// --------------------------------------------------------------------------------------------
// Add / edit
// --------------------------------------------------------------------------------------------

const LIMIT_SOURCES: { value: string; label: string }[] = [
  ...MODEL_LIMITS.map((m) => ({ value: `model:${m.key}`, label: `Unit model: ${m.label}` })),
  ...JOB_SETTINGS.map((s) => ({ value: `job:${s.key}`, label: `Job setting: ${s.label}` })),
  ...Object.values(CODE_LIMITS).map((c) => ({ value: `code:${c.key}`, label: `${c.document} ${c.section}: ${c.label}` })),
];

function toRef(value: string): LimitRef | undefined {
  const [from, ...rest] = value.split(':');
  const key = rest.join(':');
  if (!key) return undefined;
  if (from === 'model' || from === 'job' || from === 'code') return { from, key } as LimitRef;
  return undefined;
}
const fromRef = (ref: LimitRef | undefined) => (ref ? `${ref.from}:${ref.key}` : '');

/** The form as typed: choices as the pickers hold them; the rule's limits as "model:key" etc. */
interface Draft {
  code: string;
  group: string;
  title: string;
  description: string;
  unitKinds: UnitKindKey[];
  defaultSeverity: Severity;
  trade: TradeKey;
  fixGuidance: string;
  caution: string;
  needsCeilingAccess: 'yes' | 'no';
  /** Form-only: whether the defect type has a measured rule at all. */
  hasRule: 'yes' | 'no';
  measuredRule: {
    measure: string;
    quantity: string;
    comparison: string;
    limit: string;
    upper: string;
    tolerance: string;
    expected: 'yes' | 'no';
    /** Kept from the item: the code calculation that decides the rule (not edited here). */
    codeCheck?: CodeCheckKey;
  };
}

function draftOf(item?: CatalogueItemDto): Draft {
  const r = item?.measuredRule;
  return {
    code: item?.code ?? '',
    group: item?.group ?? 'mounting',
    title: item?.title ?? '',
    description: item?.description ?? '',
    unitKinds: item?.unitKinds ?? [],
    defaultSeverity: item?.defaultSeverity ?? 'major',
    trade: item?.trade ?? 'mechanical',
    fixGuidance: item?.fixGuidance ?? '',
    caution: item?.caution ?? '',
    needsCeilingAccess: item?.needsCeilingAccess ? 'yes' : 'no',
    hasRule: r ? 'yes' : 'no',
    measuredRule: {
      measure: r?.measure ?? '',
      quantity: r?.quantity ?? 'length',
      comparison: r?.comparison ?? 'at_least',
      limit: fromRef(r?.limit),
      upper: fromRef(r?.upper),
      tolerance: r?.tolerance !== undefined ? String(r.tolerance) : '',
      expected: r?.expected === false ? 'no' : 'yes',
      codeCheck: r?.codeCheck,
    },
  };
}

/** The request body the draft stands for (the shared schema then checks it, paths unchanged). */
function bodyOf(d: Draft, withCode: boolean): CreateCatalogueItemInput {
  const r = d.measuredRule;
  const measuredRule =
    d.hasRule === 'yes'
      ? {
          measure: r.measure,
          quantity: r.quantity,
          comparison: r.comparison,
          ...(r.comparison !== 'yes_no' ? { limit: toRef(r.limit) } : {}),
          ...(r.comparison === 'between' ? { upper: toRef(r.upper) } : {}),
          ...(r.comparison === 'equal_within' ? { tolerance: Number(r.tolerance) } : {}),
          ...(r.comparison === 'yes_no' ? { expected: r.expected === 'yes' } : {}),
          // The code check is kept while the rule keeps the shape it decides (yes/no passing on yes, or its comparison and quantity).
          ...(r.codeCheck &&
          CODE_CHECK_RULES[r.codeCheck].comparison === r.comparison &&
          CODE_CHECK_RULES[r.codeCheck].quantity === r.quantity &&
          (r.comparison !== 'yes_no' || r.expected === 'yes')
            ? { codeCheck: r.codeCheck }
            : {}),
        }
      : null;
  return {
    ...(withCode ? { code: d.code } : {}),
    group: d.group,
    title: d.title,
    description: d.description,
    unitKinds: d.unitKinds,
    defaultSeverity: d.defaultSeverity,
    trade: d.trade,
    measuredRule,
    fixGuidance: d.fixGuidance,
    caution: d.caution.trim() === '' ? null : d.caution,
    needsCeilingAccess: d.needsCeilingAccess === 'yes',
  } as CreateCatalogueItemInput;
}

const createResolver = preparedFor<Draft, CreateCatalogueItemInput, unknown, z.output<typeof createCatalogueItemSchema>>(
  zodResolver(createCatalogueItemSchema),
  (d) => bodyOf(d, true),
);
const updateResolver = preparedFor<Draft, UpdateCatalogueItemInput, unknown, z.output<typeof updateCatalogueItemSchema>>(
  zodResolver(updateCatalogueItemSchema),
  (d) => bodyOf(d, false) as UpdateCatalogueItemInput,
);

const FIELDS = [
  'code',
  'group',
  'title',
  'description',
  'unitKinds',
  'defaultSeverity',
  'trade',
  'fixGuidance',
  'caution',
  'needsCeilingAccess',
  'measuredRule.measure',
  'measuredRule.quantity',
  'measuredRule.comparison',
  'measuredRule.limit',
  'measuredRule.upper',
  'measuredRule.tolerance',
  'measuredRule.expected',
] as const;

const COMPARISON_LABEL: Record<string, string> = {
  at_least: 'At least the limit',
  at_most: 'At most the limit',
  between: 'Between two limits',
  equal_within: 'Equal to the limit, within a tolerance',
  yes_no: 'A yes/no answer',
};

function CatalogueForm({ job, existing, onDone }: { job: JobDetail; existing?: CatalogueItemDto; onDone: () => void }) {
  const wide = useWide();
  const create = useCreateCatalogueItemMutation(job.id);
  const update = useUpdateCatalogueItemMutation(job.id);
  const { control, handleSubmit, setError, watch, formState } = useForm<Draft, unknown, CreateCatalogueItemInput | UpdateCatalogueItemInput>({
    resolver: (existing ? updateResolver : createResolver) as Resolver<Draft, unknown, CreateCatalogueItemInput | UpdateCatalogueItemInput>,
    defaultValues: draftOf(existing),
  });
  const hasRule = watch('hasRule');
  const cautionNeeded = (HAZARDOUS_GROUPS as readonly string[]).includes(watch('group')) || watch('needsCeilingAccess') === 'yes';
  const comparison = watch('measuredRule.comparison');

  const submit = handleSubmit(async (body) => {
    try {
      if (existing) await update.mutateAsync({ item: existing, input: body as UpdateCatalogueItemInput });
      else await create.mutateAsync(body as CreateCatalogueItemInput);
      onDone();
    } catch (err) {
      showServerErrors(err, setError, FIELDS);
    }
  });

  const errors = formState.errors;
  const ruleError = errors.measuredRule?.message ?? errors.measuredRule?.root?.message;
  const pair = wide ? styles.pair : null;
  return (
    <Card testID="catalogue-form">
      <AppText variant="heading">{existing ? `Edit ${existing.code}` : 'New defect type'}</AppText>
      <FormBanner control={control} testID="catalogue-form-error" />
      <View style={pair}>
        {!existing ? (
          <View style={styles.cell}>
            <FormText control={control} name="code" label="Code" testID="catalogue-code-input" placeholder="e.g. DR-41" autoCapitalize="characters" />
          </View>
        ) : null}
        <View style={styles.cell}>
          <FormSelect control={control} name="group" label="Group" testID="catalogue-group-input" options={CATALOGUE_GROUPS.map((g) => ({ value: g.key, label: g.label }))} />
        </View>
      </View>
      <FormText control={control} name="title" label="Title" testID="catalogue-title-input" />
      <FormText control={control} name="description" label="Description" testID="catalogue-description-input" limit={CATALOGUE_TEXT_LIMITS.description} multiline style={styles.multi} />
      <FormChips control={control} name="unitKinds" label="Applies to" options={UNIT_KINDS.map((k) => ({ value: k.key, label: k.label }))} testID="catalogue-kinds-input" />
      <View style={pair}>
        <View style={styles.cell}>
          <FormSelect
            control={control}
            name="defaultSeverity"
            label="Default severity"
            testID="catalogue-severity-input"
            options={SEVERITIES.map((s) => ({ value: s, label: SEVERITY_LABELS[s] }))}
          />
        </View>
        <View style={styles.cell}>
          <FormSelect control={control} name="trade" label="Usual trade" testID="catalogue-trade-input" options={TRADES.map((t) => ({ value: t.key, label: t.label }))} />
        </View>
      </View>
      <FormText control={control} name="fixGuidance" label="How to fix" testID="catalogue-fix-input" limit={CATALOGUE_TEXT_LIMITS.fixGuidance} multiline style={styles.multi} />
      <FormText
        control={control}
        name="caution"
        label={cautionNeeded ? 'Caution' : 'Caution (optional)'}
        testID="catalogue-caution-input"
        limit={CATALOGUE_TEXT_LIMITS.caution}
        multiline
        style={styles.multi}
        hint={
          cautionNeeded
            ? "Needed: this group's work, or a fix above the ceiling, is hazardous. Name the hazard and end with: the manufacturer's installation manual, local codes and licensed practice govern."
            : 'For hazardous work: electrical, refrigerant, brazing, lifting, overhead.'
        }
      />
      <FormSegmented
        control={control}
        name="needsCeilingAccess"
        label="The fix needs access above the ceiling"
        testID="catalogue-ceiling-access"
        options={NO_YES}
      />
      <FormSegmented
        control={control}
        name="hasRule"
        label="Measured rule"
        testID="catalogue-has-rule"
        options={RULE_OR_NONE}
      />
      {hasRule === 'yes' ? (
        <View style={styles.rule}>
          {ruleError ? <Notice tone="error">{ruleError}</Notice> : null}
          <FormText control={control} name="measuredRule.measure" label="What is measured" testID="catalogue-measure-input" placeholder="e.g. Pump lift from the unit's base" />
          <View style={pair}>
            <View style={styles.cell}>
              <FormSelect control={control} name="measuredRule.quantity" label="Quantity" testID="catalogue-quantity-input" options={QUANTITY_KINDS.map((q) => ({ value: q, label: q }))} />
            </View>
            <View style={styles.cell}>
              <FormSelect
                control={control}
                name="measuredRule.comparison"
                label="Passes when"
                testID="catalogue-comparison-input"
                options={COMPARISONS.map((c) => ({ value: c, label: COMPARISON_LABEL[c] ?? c }))}
              />
            </View>
          </View>
          {comparison === 'yes_no' ? (
            <FormSegmented
              control={control}
              name="measuredRule.expected"
              label="The answer that passes"
              testID="catalogue-expected-input"
              options={YES_NO}
            />
          ) : (
            <FormSelect
              control={control}
              name="measuredRule.limit"
              label={comparison === 'between' ? 'Lower limit from' : 'Limit from'}
              testID="catalogue-limit-input"
              placeholder="Choose where the limit comes from"
              options={LIMIT_SOURCES}
            />
          )}
          {comparison === 'between' ? (
            <FormSelect
              control={control}
              name="measuredRule.upper"
              label="Upper limit from"
              testID="catalogue-upper-input"
              placeholder="Choose where the limit comes from"
              options={LIMIT_SOURCES}
            />
          ) : null}
          {comparison === 'equal_within' ? (
            <FormText
              control={control}
              name="measuredRule.tolerance"
              label="Tolerance (base units: mm, degrees or ratio)"
              testID="catalogue-tolerance-input"
              inputMode="decimal"
            />
          ) : null}
        </View>
      ) : null}
      <View style={styles.actions}>
        <Button testID="catalogue-submit" label={existing ? 'Save defect type' : 'Add defect type'} onPress={submit} busy={create.isPending || update.isPending} />
        <Button label="Cancel" tone="quiet" onPress={onDone} />
      </View>
    </Card>
  );
}

const styles = StyleSheet.create({
  body: { gap: space.lg },
  filters: { flexDirection: 'row', flexWrap: 'wrap', gap: space.md, alignItems: 'flex-end' },
  filter: { flexGrow: 1, flexBasis: 200, minWidth: 0 },
  groups: { gap: space.xl },
  group: { gap: space.sm },
  item: { backgroundColor: colors.surface, borderRadius: radius.md, borderWidth: 1, borderColor: colors.line, padding: space.md, gap: space.sm },
  retired: { opacity: 0.7, borderStyle: 'dashed' },
  itemHead: { flexDirection: 'row', alignItems: 'flex-start', gap: space.md },
  code: { minWidth: 52, paddingTop: 2, color: colors.spruce },
  grow: { flexGrow: 1, flexShrink: 1, minWidth: 0, gap: space.xs },
  meta: { flexDirection: 'row', flexWrap: 'wrap', gap: space.xs },
  severity: { alignSelf: 'flex-start', borderRadius: radius.sm, paddingHorizontal: space.sm, paddingVertical: 2 },
  detail: { gap: space.sm, borderTopWidth: 1, borderTopColor: colors.line, paddingTop: space.sm },
  actions: { flexDirection: 'row', flexWrap: 'wrap', gap: space.xs, alignItems: 'center' },
  pair: { flexDirection: 'row', gap: space.lg },
  cell: { flex: 1, minWidth: 0 },
  multi: { minHeight: 90, paddingTop: space.sm, textAlignVertical: 'top' },
  summary: { gap: space.xs, borderLeftWidth: 3, borderLeftColor: colors.spruce, paddingLeft: space.md },
  rule: { borderLeftWidth: 3, borderLeftColor: colors.spruceSoft, paddingLeft: space.md },
});
