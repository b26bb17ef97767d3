import { zodResolver } from '@hookform/resolvers/zod';
import { Link } from 'expo-router';
import { useEffect, useState } from 'react';
import { useForm } from 'react-hook-form';
import { StyleSheet, View } from 'react-native';
import { formatQuantity } from '../../shared/calc/format';
import { MOUNT_POSITION_LABELS, MOUNT_POSITIONS } from '../../shared/calc/refrigerant';
import { createUnitSchema, crewLabel, type JobDetail, type UnitDto } from '../../shared/schemas/setup';
import { UNIT_KINDS, UNIT_KIND_LABELS, type UnitKindKey } from '../../shared/words';
import { exportUrls } from '../api/exports';
import { ExportLink } from '../exports/ExportLink';
import { unitLabelsUrl } from '../scan/labelsLink';
import { useLevelsQuery } from '../queries/levels';
import { useModelsQuery } from '../queries/models';
import { useSpacesQuery } from '../queries/spaces';
import { useCrewsQuery } from '../queries/crews';
import { useSystemsQuery } from '../queries/systems';
import {
  useCreateUnitMutation,
  useDeleteUnitMutation,
  useUnitsQuery,
  useUpdateUnitMutation,
  type UnitFilters,
} from '../queries/units';
import { colors, radius, space } from '../theme';
import { AppText } from '../ui/AppText';
import { Button } from '../ui/Button';
import { Card } from '../ui/Card';
import { Notice } from '../ui/Notice';
import { EmptyState, ErrorState, LoadingState } from '../ui/States';
import { Table, type Column } from '../ui/Table';
import { useWide } from '../ui/useWide';
import { FormBanner } from '../ui/FormBanner';
import { FormQuantity, FormSelect, FormText } from '../ui/FormFields';
import { writeErrorMessage } from '../api/writeErrors';
import { showServerErrors } from './formErrors';
import { links } from '../links';
import { SetupFrame, canEditSetup } from './SetupFrame';
import { UnitFiltersBar } from './UnitFiltersBar';
import { UnitBulkDelete } from './UnitBulkDelete';

/** Kept for the catalogue and models screens still importing it from here; it goes once they use UNIT_KIND_LABELS from shared/words. */
export const KIND_LABEL = UNIT_KIND_LABELS;

export function UnitsScreen({ jobId }: { jobId: string }) {
  return (
    <SetupFrame
      jobId={jobId}
      section="units"
      title="Units"
      intro="The indoor unit register: every unit by its equipment tag, where it is and which system it is on."
      testID="units-screen"
    >
      {(job) => <UnitsBody job={job} />}
    </SetupFrame>
  );
}

function UnitsBody({ job }: { job: JobDetail }) {
  const editor = canEditSetup(job);
  const wide = useWide();
  const [filters, setFilters] = useState<UnitFilters>({});
  const [form, setForm] = useState<{ unit?: UnitDto } | null>(null);
  const [bulk, setBulk] = useState(false);
  const levels = useLevelsQuery(job.id);
  const spaces = useSpacesQuery(job.id);
  const systems = useSystemsQuery(job.id);
  const units = useUnitsQuery(job.id, filters);
  const rows = units.data?.pages.flatMap((p) => p.items) ?? [];
  const filtered = Boolean(filters.levelId || filters.spaceId || filters.systemId || filters.kind || filters.q);

  return (
    <View style={styles.body}>
      <View style={styles.toolbar}>
        {editor ? <Button testID="unit-add" label="Add a unit" onPress={() => setForm({})} /> : null}
        {editor ? (
          <Link href={links.setup(job.id, 'import')} asChild>
            <Button testID="unit-import-link" label="Import from CSV" tone="secondary" />
          </Link>
        ) : null}
        {editor ? <Button testID="units-bulk-open" label="Delete several" tone="secondary" onPress={() => setBulk(true)} /> : null}
        <ExportLink testID="unit-export" label={filtered ? 'Download these as CSV' : 'Download CSV'} href={exportUrls.unitsCsv(job.id, filters)} />
        {editor && (filters.levelId || filters.systemId) ? (
          <ExportLink
            testID="unit-labels"
            label={filters.levelId ? 'Print labels for this level' : 'Print labels for this system'}
            href={unitLabelsUrl(job.id, filters.levelId ? { levelId: filters.levelId } : { systemId: filters.systemId! })}
          />
        ) : null}
      </View>
      {form && editor && levels.data ? (
        <UnitForm
          key={form.unit?.id ?? 'new'}
          job={job}
          existing={form.unit}
          levels={levels.data}
          onDone={() => setForm(null)}
        />
      ) : null}
      {bulk && editor ? <UnitBulkDelete jobId={job.id} rows={rows} onClose={() => setBulk(false)} /> : null}
      <UnitFiltersBar value={filters} onChange={setFilters} levels={levels.data ?? []} spaces={spaces.data ?? []} systems={systems.data ?? []} />
      {units.isPending ? (
        <LoadingState label="Loading units…" />
      ) : units.isError ? (
        <ErrorState message={units.error.message} onRetry={() => units.refetch()} />
      ) : rows.length === 0 ? (
        filtered ? (
          <EmptyState title="No units match" body="Try another level, space, system or kind, or clear the filters." testID="units-empty-filtered" />
        ) : (
          <EmptyState
            title="No units yet"
            body={editor ? 'Add units one by one, or import the equipment schedule from a CSV file.' : 'The GC manager has not added units yet.'}
            testID="units-empty"
          />
        )
      ) : (
        <>
          {wide ? (
            <UnitTable job={job} rows={rows} editor={editor} onEdit={(unit) => setForm({ unit })} />
          ) : (
            <View style={styles.cards} testID="units-cards">
              {rows.map((u) => (
                <UnitCard key={u.id} job={job} unit={u} editor={editor} onEdit={() => setForm({ unit: u })} />
              ))}
            </View>
          )}
          <View style={styles.more}>
            <AppText variant="small" muted testID="units-count">
              Showing {rows.length} unit{rows.length === 1 ? '' : 's'}
              {units.hasNextPage ? '; more below' : ''}.
            </AppText>
            {units.hasNextPage ? (
              <Button testID="units-load-more" label="Load more" tone="secondary" busy={units.isFetchingNextPage} onPress={() => units.fetchNextPage()} />
            ) : null}
          </View>
        </>
      )}
    </View>
  );
}

function capacityText(unit: UnitDto, job: JobDetail): string {
  return unit.capacity === null ? '—' : formatQuantity(unit.capacity, 'capacity', job.unitSystem);
}

function UnitTable({ job, rows, editor, onEdit }: { job: JobDetail; rows: UnitDto[]; editor: boolean; onEdit: (u: UnitDto) => void }) {
  const columns: Column<UnitDto>[] = [
    { key: 'tag', title: 'Tag', flex: 1.1, render: (u) => <AppText variant="label">{u.tag}</AppText> },
    { key: 'kind', title: 'Kind', flex: 1.6, render: (u) => UNIT_KIND_LABELS[u.kind] },
    { key: 'model', title: 'Model', flex: 1.2, render: (u) => u.modelName ?? '—' },
    { key: 'capacity', title: 'Capacity', flex: 1.1, render: (u) => capacityText(u, job) },
    { key: 'where', title: 'Level · space', flex: 1.6, render: (u) => `${u.levelName}${u.spaceName ? ` · ${u.spaceName}` : ''}` },
    { key: 'system', title: 'System', flex: 1, render: (u) => u.systemName ?? '—' },
    { key: 'crew', title: 'Installed by', flex: 1.4, render: (u) => (u.installedByCrew ? crewLabel(u.installedByCrew) : '—') },
  ];
  if (editor) {
    columns.push({
      key: 'actions',
      title: '',
      flex: 0.8,
      render: (u) => <Button label="Edit" tone="quiet" aria-label={`Edit unit ${u.tag}`} testID={`unit-edit-${u.tag}`} onPress={() => onEdit(u)} />,
    });
  }
  return <Table columns={columns} rows={rows} rowKey={(u) => u.id} testID="units-table" rowTestID={(u) => `unit-row-${u.tag}`} />;
}

function UnitCard({ job, unit, editor, onEdit }: { job: JobDetail; unit: UnitDto; editor: boolean; onEdit: () => void }) {
  return (
    <View style={styles.card} testID={`unit-row-${unit.tag}`}>
      <View style={styles.cardHead}>
        <AppText variant="heading">{unit.tag}</AppText>
        {editor ? <Button label="Edit" tone="quiet" aria-label={`Edit unit ${unit.tag}`} testID={`unit-edit-${unit.tag}`} onPress={onEdit} /> : null}
      </View>
      <AppText variant="small">
        {UNIT_KIND_LABELS[unit.kind]}
        {unit.modelName ? ` · ${unit.modelName}` : ''} · {capacityText(unit, job)}
      </AppText>
      <AppText variant="small" muted>
        {unit.levelName}
        {unit.spaceName ? ` · ${unit.spaceName}` : ''} · {unit.systemName ? `system ${unit.systemName}` : 'no system'}
        {unit.effectiveMount ? ` · ${unit.effectiveMount.mount}-mounted` : ''}
      </AppText>
      {unit.installedByCrew ? (
        <AppText variant="small" muted testID={`unit-crew-${unit.tag}`}>
          Installed by {crewLabel(unit.installedByCrew)}
        </AppText>
      ) : null}
    </View>
  );
}

const FIELDS = ['tag', 'kind', 'modelId', 'capacity', 'levelId', 'spaceId', 'systemId', 'mountPosition', 'installedByCrewId'] as const;

function UnitForm({
  job,
  existing,
  levels,
  onDone,
}: {
  job: JobDetail;
  existing?: UnitDto;
  levels: { id: string; name: string }[];
  onDone: () => void;
}) {
  const wide = useWide();
  const create = useCreateUnitMutation(job.id);
  const update = useUpdateUnitMutation(job.id);
  const remove = useDeleteUnitMutation(job.id);
  const [removeError, setRemoveError] = useState<string | null>(null);
  const metric = job.unitSystem === 'metric';
  const { control, handleSubmit, setError, watch, reset, getValues, setValue } = useForm({
    resolver: zodResolver(createUnitSchema),
    defaultValues: {
      tag: existing?.tag ?? '',
      kind: existing?.kind ?? 'cassette_4way',
      modelId: existing?.modelId ?? null,
      capacity: existing?.capacity != null ? formatQuantity(existing.capacity, 'capacity', job.unitSystem).replace(/,/g, '') : null,
      levelId: existing?.levelId ?? levels[0]?.id ?? '',
      spaceId: existing?.spaceId ?? null,
      systemId: existing?.systemId ?? null,
      mountPosition: existing?.mountPosition ?? null,
      installedByCrewId: existing?.installedByCrew?.id ?? null,
    },
  });
  const levelId = watch('levelId');
  const kind = watch('kind') as UnitKindKey;
  const spaces = useSpacesQuery(job.id, levelId || undefined);
  const systems = useSystemsQuery(job.id);
  const models = useModelsQuery(job.id, kind);
  const crews = useCrewsQuery(job.id);

  // A space or model that no longer fits the chosen level or kind is dropped, not sent.
  useEffect(() => {
    const spaceId = getValues('spaceId');
    if (spaces.data && spaceId && !spaces.data.some((s) => s.id === spaceId)) setValue('spaceId', null);
  }, [spaces.data, getValues, setValue]);
  useEffect(() => {
    const modelId = getValues('modelId');
    if (models.data && modelId && !models.data.some((m) => m.id === modelId)) setValue('modelId', null);
  }, [models.data, getValues, setValue]);

  const submit = handleSubmit(async (values) => {
    try {
      if (existing) {
        await update.mutateAsync({ unit: existing, input: values });
        onDone();
      } else {
        await create.mutateAsync(values);
        // Keep where we are: the next unit is usually on the same level, space and system.
        reset({ ...values, tag: '' });
      }
    } catch (err) {
      showServerErrors(err, setError, FIELDS, { duplicate_tag: 'tag' });
    }
  });

  const pair = wide ? styles.pair : null;
  return (
    <Card testID="unit-form">
      <AppText variant="heading">{existing ? `Edit ${existing.tag}` : 'Add a unit'}</AppText>
      <FormBanner control={control} testID="unit-form-error" />
      {removeError ? <Notice tone="error">{removeError}</Notice> : null}
      <View style={pair}>
        <View style={styles.cell}>
          <FormText control={control} name="tag" label="Tag" testID="unit-tag-input" placeholder="e.g. IU-3-07" autoCapitalize="characters" />
        </View>
        <View style={styles.cell}>
          <FormSelect control={control} name="kind" label="Unit kind" testID="unit-kind-input" options={UNIT_KINDS.map((k) => ({ value: k.key, label: k.label }))} />
        </View>
      </View>
      <View style={pair}>
        <View style={styles.cell}>
          <FormSelect
            control={control}
            name="modelId"
            label="Model (optional)"
            testID="unit-model-input"
            placeholder={models.data && models.data.length === 0 ? 'No models of this kind yet' : 'No model'}
            nullable
            options={(models.data ?? []).map((m) => ({ value: m.id, label: m.modelNumber ? `${m.name} (${m.modelNumber})` : m.name }))}
          />
        </View>
        <View style={styles.cell}>
          <FormQuantity
            control={control}
            name="capacity"
            label="Nominal capacity (optional)"
            testID="unit-capacity-input"
            units={metric ? ['kW', 'Btu/h', 'ton'] : ['Btu/h', 'ton', 'kW']}
            defaultUnit={metric ? 'kW' : 'Btu/h'}
            hint="36000 Btu/h, 3 tons or 10.5 kW."
          />
        </View>
      </View>
      <View style={pair}>
        <View style={styles.cell}>
          <FormSelect control={control} name="levelId" label="Level" testID="unit-level-input" options={levels.map((l) => ({ value: l.id, label: l.name }))} />
        </View>
        <View style={styles.cell}>
          <FormSelect
            control={control}
            name="spaceId"
            label="Space (optional)"
            testID="unit-space-input"
            placeholder="No space"
            nullable
            options={(spaces.data ?? []).map((s) => ({ value: s.id, label: s.name }))}
          />
        </View>
        <View style={styles.cell}>
          <FormSelect
            control={control}
            name="systemId"
            label="System (optional)"
            testID="unit-system-input"
            placeholder="No system"
            nullable
            options={(systems.data ?? []).map((s) => ({ value: s.id, label: s.name }))}
          />
        </View>
      </View>
      <FormSelect
        control={control}
        name="mountPosition"
        label="Mounting position (optional)"
        hint="Leave it to the model's installation position unless this unit is installed otherwise (e.g. an air handler standing in a closet). Sets the release height for the A2L floor-area check."
        testID="unit-mount-input"
        placeholder="As its model (or its kind)"
        nullable
        options={MOUNT_POSITIONS.map((m) => ({ value: m, label: MOUNT_POSITION_LABELS[m] }))}
      />
      <FormSelect
        control={control}
        name="installedByCrewId"
        label="Installed by crew (optional)"
        hint="The crew that hung and connected this unit: recurring defects are shown by crew. Companies name their crews on the Crews page."
        testID="unit-crew-input"
        placeholder="Not recorded"
        nullable
        options={(crews.data?.items ?? []).map((c) => ({ value: c.id, label: crewLabel(c) }))}
      />
      <View style={styles.actions}>
        <Button testID="unit-submit" label={existing ? 'Save unit' : 'Add unit'} onPress={submit} busy={create.isPending || update.isPending} />
        <Button label={existing ? 'Cancel' : 'Done'} tone="quiet" testID="unit-form-close" onPress={onDone} />
        {existing ? (
          <Button
            label="Delete unit"
            tone="quiet"
            busy={remove.isPending}
            onPress={() => {
              setRemoveError(null);
              remove.mutate(existing, { onSuccess: onDone, onError: (err) => setRemoveError(writeErrorMessage(err)) });
            }}
          />
        ) : null}
      </View>
    </Card>
  );
}

const styles = StyleSheet.create({
  body: { gap: space.lg },
  toolbar: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm, alignItems: 'center' },
  cards: { gap: space.sm },
  card: { backgroundColor: colors.surface, borderRadius: radius.md, borderWidth: 1, borderColor: colors.line, padding: space.md, gap: 2 },
  cardHead: { flexDirection: 'row', justifyContent: 'space-between', alignItems: 'center', gap: space.sm },
  more: { alignItems: 'center', gap: space.sm },
  pair: { flexDirection: 'row', gap: space.lg },
  cell: { flex: 1, minWidth: 0 },
  actions: { flexDirection: 'row', flexWrap: 'wrap', gap: space.xs, alignItems: 'center' },
});
