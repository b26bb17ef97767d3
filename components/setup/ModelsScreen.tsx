import { zodResolver } from '@hookform/resolvers/zod';
import { useState } from 'react';
import { useForm, type Path, type Resolver } from 'react-hook-form';
import { StyleSheet, View } from 'react-native';
import type { z } from 'zod';
import { formatQuantity } from '../../shared/calc/format';
import { MOUNT_POSITION_LABELS, MOUNT_POSITIONS } from '../../shared/calc/refrigerant';
import { MODEL_LIMITS, type ModelLimitKey, type QuantityKind } from '../../shared/catalogue/types';
import { createModelSchema, type CreateModelInput, type JobDetail, type StatedLimitInput, type UnitModelDto } from '../../shared/schemas/setup';
import { isPageOnly, limitSource, splitLimitSources } from '../../shared/rules/limitSource';
import { UNIT_KINDS } from '../../shared/words';
import { useCreateModelMutation, useDeleteModelMutation, useModelsQuery, useUpdateModelMutation } from '../queries/models';
import { colors, radius, space } from '../theme';
import { AppText } from '../ui/AppText';
import { Button } from '../ui/Button';
import { Card } from '../ui/Card';
import { Notice } from '../ui/Notice';
import { EmptyState, ErrorState, LoadingState } from '../ui/States';
import { useWide } from '../ui/useWide';
import { FormBanner } from '../ui/FormBanner';
import { FormQuantity, FormSelect, FormText, preparedFor } from '../ui/FormFields';
import { showServerErrors, writeErrorMessage } from './formErrors';
import { SetupFrame, canEditSetup } from './SetupFrame';
import { KIND_LABEL } from './UnitsScreen';

export function ModelsScreen({ jobId }: { jobId: string }) {
  return (
    <SetupFrame
      jobId={jobId}
      section="models"
      title="Unit models"
      intro="Limits taken from each model's installation manual (pump lift, clearances, drain run…), each with the unit it is stated in and where it came from. Measured rules check against them."
      testID="models-screen"
    >
      {(job) => <ModelsBody job={job} />}
    </SetupFrame>
  );
}

function ModelsBody({ job }: { job: JobDetail }) {
  const editor = canEditSetup(job);
  const models = useModelsQuery(job.id);
  const [form, setForm] = useState<{ model?: UnitModelDto } | null>(null);
  return (
    <View style={styles.body}>
      {editor ? (
        form ? (
          <ModelForm key={form.model?.id ?? 'new'} job={job} existing={form.model} onDone={() => setForm(null)} />
        ) : (
          <Button testID="model-add" label="Add a model" tone="secondary" onPress={() => setForm({})} style={styles.start} />
        )
      ) : null}
      {models.isPending ? (
        <LoadingState label="Loading models…" />
      ) : models.isError ? (
        <ErrorState message={models.error.message} onRetry={() => models.refetch()} />
      ) : models.data.length === 0 ? (
        <EmptyState
          title="No unit models yet"
          body={editor ? 'Add each indoor unit model used on the job, with the limits from its installation manual.' : 'The GC manager has not added unit models yet.'}
          testID="models-empty"
        />
      ) : (
        <View style={styles.list} testID="models-list">
          {models.data.map((m) => (
            <ModelCard key={m.id} job={job} model={m} editor={editor} onEdit={() => setForm({ model: m })} />
          ))}
        </View>
      )}
    </View>
  );
}

function ModelCard({ job, model, editor, onEdit }: { job: JobDetail; model: UnitModelDto; editor: boolean; onEdit: () => void }) {
  const remove = useDeleteModelMutation(job.id);
  const [error, setError] = useState<string | null>(null);
  const limits = MODEL_LIMITS.filter((l) => model.limits[l.key]);
  return (
    <Card testID={`model-card-${model.name}`}>
      <View style={styles.head}>
        <View style={styles.grow}>
          <AppText variant="heading">
            {model.name}
            {model.modelNumber ? ` (${model.modelNumber})` : ''}
          </AppText>
          <AppText variant="small" muted>
            {KIND_LABEL[model.unitKind]}
            {model.nominalCapacity !== null ? ` · ${formatQuantity(model.nominalCapacity, 'capacity', job.unitSystem)}` : ''} · {model.unitCount} unit
            {model.unitCount === 1 ? '' : 's'}
            {model.mountPosition ? ` · ${MOUNT_POSITION_LABELS[model.mountPosition]}` : ''}
          </AppText>
        </View>
        {editor ? (
          <View style={styles.actions}>
            <Button label="Edit" tone="quiet" aria-label={`Edit model ${model.name}`} testID={`model-edit-${model.name}`} onPress={onEdit} />
            <Button
              label="Delete"
              aria-label={`Delete model ${model.name}`}
              tone="quiet"
              busy={remove.isPending}
              onPress={() => {
                setError(null);
                remove.mutate(model, { onError: (err) => setError(writeErrorMessage(err)) });
              }}
            />
          </View>
        ) : null}
      </View>
      {error ? <Notice tone="error">{error}</Notice> : null}
      {limits.length === 0 ? (
        <AppText variant="small" muted>
          No limits entered yet.
        </AppText>
      ) : (
        <View style={styles.limits}>
          {limits.map((l) => {
            const v = model.limits[l.key]!;
            return (
              <View key={l.key} style={styles.limit} testID={`model-limit-${l.key}`}>
                <AppText variant="small" style={styles.limitLabel}>
                  {l.label}
                </AppText>
                <View style={styles.limitValue}>
                  <AppText variant="label">
                    {v.text}
                    {/* A tolerance stated as a tilt across a width: the height difference it allows. */}
                    {/\s(across|over)\s/i.test(v.text) ? ` = ${formatQuantity(v.value, l.quantity, job.unitSystem)}` : ''}
                  </AppText>
                  <AppText variant="small" muted>
                    Source: {v.source}
                  </AppText>
                </View>
              </View>
            );
          })}
        </View>
      )}
    </Card>
  );
}

/**
 * A limit as typed; value and source both empty mean none (removed when the model had one). Its
 * source is a page of the model's manual (named once, above the limits) or a source of its own.
 */
type LimitDraft = { value: string; source: string };
type ModelFormValues = Omit<CreateModelInput, 'limits'> & { manual: string; limits: Record<ModelLimitKey, LimitDraft> };
type ModelFormParsed = z.output<typeof createModelSchema>;

/** A placeholder in the quantity each model limit is stated in. */
const LIMIT_EXAMPLES: Record<QuantityKind, string> = {
  length: 'e.g. 27-1/2 in',
  slope: 'e.g. 1/4 in/ft',
  area: 'e.g. 9 ft²',
  volume: 'e.g. 0.2 ft³',
  mass: 'e.g. 6 lb',
  capacity: 'e.g. 24000 Btu/h',
  angle: 'e.g. 30°',
  pressure: 'e.g. 0.5 in. w.c.',
  boolean: 'yes or no',
};

const FIELDS = [
  'name',
  'modelNumber',
  'unitKind',
  'nominalCapacity',
  'mountPosition',
  'manual',
  ...MODEL_LIMITS.flatMap((l) => [`limits.${l.key}.value`, `limits.${l.key}.source`]),
] as Path<ModelFormValues>[];

const NO_SOURCE = 'Name the installation manual above, or type where this value came from.';

function modelResolver(existing: UnitModelDto | undefined): Resolver<ModelFormValues, unknown, ModelFormParsed> {
  const resolver = preparedFor<ModelFormValues, CreateModelInput, unknown, ModelFormParsed>(zodResolver(createModelSchema), ({ limits: drafts, manual, ...values }) => {
    const limits: Partial<Record<ModelLimitKey, StatedLimitInput | null>> = {};
    for (const def of MODEL_LIMITS) {
      const d = drafts[def.key];
      if (d.value.trim() === '' && d.source.trim() === '') {
        if (existing?.limits[def.key]) limits[def.key] = null;
      } else limits[def.key] = { value: d.value, source: limitSource(manual, d.source) };
    }
    return { ...values, limits };
  });
  return async (values, context, options) => {
    const result = await resolver(values, context, options);
    // A limit with neither a manual above nor a source of its own: say where to name it.
    const limitErrors = result.errors.limits as Record<string, { source?: { message?: string } }> | undefined;
    for (const def of MODEL_LIMITS) {
      const error = limitErrors?.[def.key]?.source;
      if (error && limitSource(values.manual, values.limits[def.key].source) === '') {
        error.message = values.manual.trim() === '' && isPageOnly(values.limits[def.key].source) ? 'Name the installation manual above: this page is in it.' : NO_SOURCE;
      }
    }
    return result;
  };
}

/** The form's manual and each limit's page, from the sources stored with the model's limits. */
function limitDrafts(existing: UnitModelDto | undefined): { manual: string; limits: Record<ModelLimitKey, LimitDraft> } {
  const { manual, perLimit } = splitLimitSources(MODEL_LIMITS.map((l) => existing?.limits[l.key]?.source ?? ''));
  return {
    manual,
    limits: Object.fromEntries(MODEL_LIMITS.map((l, i) => [l.key, { value: existing?.limits[l.key]?.text ?? '', source: perLimit[i] ?? '' }])) as Record<
      ModelLimitKey,
      LimitDraft
    >,
  };
}

function ModelForm({ job, existing, onDone }: { job: JobDetail; existing?: UnitModelDto; onDone: () => void }) {
  const wide = useWide();
  const create = useCreateModelMutation(job.id);
  const update = useUpdateModelMutation(job.id);
  const metric = job.unitSystem === 'metric';
  const [resolver] = useState(() => modelResolver(existing));
  const { control, handleSubmit, setError } = useForm<ModelFormValues, unknown, ModelFormParsed>({
    resolver,
    defaultValues: {
      name: existing?.name ?? '',
      modelNumber: existing?.modelNumber ?? null,
      unitKind: existing?.unitKind ?? 'cassette_4way',
      nominalCapacity:
        existing?.nominalCapacity != null ? formatQuantity(existing.nominalCapacity, 'capacity', job.unitSystem).replace(/,/g, '') : null,
      mountPosition: existing?.mountPosition ?? null,
      ...limitDrafts(existing),
    },
  });

  const submit = handleSubmit(
    async (input) => {
      try {
        if (existing) await update.mutateAsync({ model: existing, input });
        else await create.mutateAsync(input);
        onDone();
      } catch (err) {
        showServerErrors(err, setError, FIELDS, { duplicate: 'name' });
      }
    },
    (errors) => {
      if (errors.limits) setError('root', { message: 'Check the limits marked below.' });
    },
  );

  return (
    <Card testID="model-form">
      <AppText variant="heading">{existing ? `Edit ${existing.name}` : 'New unit model'}</AppText>
      <FormBanner control={control} testID="model-form-error" />
      <View style={wide ? styles.pair : null}>
        <View style={styles.cell}>
          <FormText control={control} name="name" label="Model name" testID="model-name-input" placeholder="e.g. Cassette 24" />
        </View>
        <View style={styles.cell}>
          <FormText control={control} name="modelNumber" label="Model number (optional)" testID="model-number-input" nullable />
        </View>
      </View>
      <View style={wide ? styles.pair : null}>
        <View style={styles.cell}>
          <FormSelect control={control} name="unitKind" label="Unit kind" testID="model-kind-input" options={UNIT_KINDS.map((k) => ({ value: k.key, label: k.label }))} />
        </View>
        <View style={styles.cell}>
          <FormQuantity
            control={control}
            name="nominalCapacity"
            label="Nominal capacity (optional)"
            testID="model-capacity-input"
            units={metric ? ['kW', 'Btu/h', 'ton'] : ['Btu/h', 'ton', 'kW']}
            defaultUnit={metric ? 'kW' : 'Btu/h'}
          />
        </View>
      </View>
      <FormSelect
        control={control}
        name="mountPosition"
        label="Installation position (optional)"
        hint="As the manual installs it; sets the refrigerant release height for the A2L floor-area check. A unit may record its own."
        testID="model-mount-input"
        placeholder="Not recorded"
        nullable
        options={MOUNT_POSITIONS.map((m) => ({ value: m, label: MOUNT_POSITION_LABELS[m] }))}
      />
      <AppText variant="label">Limits from the installation manual</AppText>
      <FormText
        control={control}
        name="manual"
        label="Installation manual (title and edition)"
        hint="Named once for every limit below; give each limit its page, or a source of its own."
        testID="model-manual-input"
        placeholder="e.g. Cassette 24 installation manual, 2nd edition"
      />
      <AppText variant="small" muted>
        Type each value with the unit the manual states it in (e.g. 27-1/2 in, 700 mm, 30°; a level tolerance also as 1° across 840
        mm). Leave a limit empty when the manual does not give it.
      </AppText>
      {MODEL_LIMITS.map((def) => (
        <View key={def.key} style={[styles.limitForm, wide ? styles.pair : null]} testID={`model-limit-input-${def.key}`}>
          <View style={styles.cell}>
            <FormText
              control={control}
              name={`limits.${def.key}.value`}
              label={def.label}
              testID={`model-limit-${def.key}-value`}
              placeholder={def.key === 'max_level_deviation' ? 'e.g. 1/4 in, or 1° across 840 mm' : LIMIT_EXAMPLES[def.quantity]}
            />
          </View>
          <View style={styles.cell}>
            <FormText
              control={control}
              name={`limits.${def.key}.source`}
              label="Page, or another source"
              testID={`model-limit-${def.key}-source`}
              placeholder="e.g. 12"
            />
          </View>
        </View>
      ))}
      <View style={styles.actions}>
        <Button testID="model-submit" label={existing ? 'Save model' : 'Add model'} onPress={submit} busy={create.isPending || update.isPending} />
        <Button label="Cancel" tone="quiet" onPress={onDone} />
      </View>
    </Card>
  );
}

const styles = StyleSheet.create({
  body: { gap: space.lg },
  start: { alignSelf: 'flex-start' },
  list: { gap: space.md },
  head: { flexDirection: 'row', flexWrap: 'wrap', gap: space.md, alignItems: 'flex-start' },
  grow: { flexGrow: 1, flexShrink: 1, flexBasis: 260, minWidth: 0, gap: 2 },
  actions: { flexDirection: 'row', flexWrap: 'wrap', gap: space.xs, alignItems: 'center' },
  limits: { borderTopWidth: 1, borderTopColor: colors.line },
  limit: { flexDirection: 'row', flexWrap: 'wrap', gap: space.md, paddingVertical: space.sm, borderBottomWidth: 1, borderBottomColor: colors.line },
  limitLabel: { flexBasis: 260, flexGrow: 1, flexShrink: 1 },
  limitValue: { flexBasis: 220, flexGrow: 1, flexShrink: 1 },
  limitForm: { borderTopWidth: 1, borderTopColor: colors.line, paddingTop: space.sm, borderRadius: radius.sm },
  pair: { flexDirection: 'row', gap: space.lg },
  cell: { flex: 1, minWidth: 0 },
});
