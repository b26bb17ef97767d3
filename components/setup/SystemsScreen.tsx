import { zodResolver } from '@hookform/resolvers/zod';
import { Link } from 'expo-router';
import { useState } from 'react';
import { useForm } from 'react-hook-form';
import type { z } from 'zod';
import { StyleSheet, View } from 'react-native';
import { formatQuantity } from '../../shared/calc/format';
import { pickConcentrationLimit } from '../../shared/calc/refrigerant';
import {
  CONCENTRATION_LIMIT_UNITS,
  createSystemSchema,
  type ConcentrationOverride,
  type CreateSystemInput,
  type JobDetail,
  type SystemDto,
} from '../../shared/schemas/setup';
import { REFRIGERANTS, type Refrigerant } from '../../shared/words';
import { links } from '../links';
import { useJobCompaniesQuery } from '../queries/companies';
import { useCreateSystemMutation, useDeleteSystemMutation, useSystemQuery, useSystemsQuery, useUpdateSystemMutation } from '../queries/systems';
import { colors, radius, space } from '../theme';
import { AppText } from '../ui/AppText';
import { Badge } from '../ui/Badge';
import { Button } from '../ui/Button';
import { Card } from '../ui/Card';
import { Notice } from '../ui/Notice';
import { EmptyState, ErrorState, LoadingState } from '../ui/States';
import { useWide } from '../ui/useWide';
import { CONCENTRATION_STATUS, ConcentrationResultView } from './ConcentrationResult';
import { FormBanner } from '../ui/FormBanner';
import { FormQuantity, FormSelect, FormText, preparedFor } from '../ui/FormFields';
import { showServerErrors, writeErrorMessage } from './formErrors';
import { SetupFrame, canEditSetup } from './SetupFrame';

export function SystemsScreen({ jobId }: { jobId: string }) {
  return (
    <SetupFrame
      jobId={jobId}
      section="systems"
      title="Systems"
      intro="Each system is one refrigerant circuit: an outdoor unit and the indoor units on it."
      testID="systems-screen"
    >
      {(job) => <SystemsBody job={job} />}
    </SetupFrame>
  );
}

function SystemsBody({ job }: { job: JobDetail }) {
  const editor = canEditSetup(job);
  const systems = useSystemsQuery(job.id);
  const [adding, setAdding] = useState(false);
  return (
    <View style={styles.body}>
      {editor ? (
        adding ? (
          <SystemForm job={job} onDone={() => setAdding(false)} />
        ) : (
          <Button testID="system-add" label="Add a system" tone="secondary" onPress={() => setAdding(true)} style={styles.start} />
        )
      ) : null}
      {systems.isPending ? (
        <LoadingState label="Loading systems…" />
      ) : systems.isError ? (
        <ErrorState message={systems.error.message} onRetry={() => systems.refetch()} />
      ) : systems.data.length === 0 ? (
        <EmptyState
          title="No systems yet"
          body={editor ? 'Add each outdoor unit and its refrigerant, then assign indoor units to it.' : 'The GC manager has not added systems yet.'}
          testID="systems-empty"
        />
      ) : (
        <View style={styles.list} testID="systems-list">
          {systems.data.map((s) => (
            <SystemCard key={s.id} job={job} system={s} editor={editor} />
          ))}
        </View>
      )}
    </View>
  );
}

function SystemCard({ job, system, editor }: { job: JobDetail; system: SystemDto; editor: boolean }) {
  const [open, setOpen] = useState(false);
  const [editing, setEditing] = useState(false);
  const [error, setError] = useState<string | null>(null);
  const remove = useDeleteSystemMutation(job.id);
  const companies = useJobCompaniesQuery(job.id);
  // Loaded for every card: the list shows each system's refrigerant status at a glance.
  const detail = useSystemQuery(job.id, system.id);
  const status = detail.data ? CONCENTRATION_STATUS[detail.data.concentration.status] : null;
  const mass = (kg: number | null) => (kg === null ? 'not set' : formatQuantity(kg, 'mass', job.unitSystem));
  if (editing) return <SystemForm job={job} existing={system} onDone={() => setEditing(false)} />;
  return (
    <Card testID={`system-card-${system.name}`}>
      <View style={styles.cardHead}>
        <View style={styles.grow}>
          <View style={styles.nameRow}>
            <AppText variant="heading">{system.name}</AppText>
            {status ? <Badge label={status.label} tone={status.tone} testID={`system-status-${system.name}`} /> : null}
          </View>
          <AppText variant="small" muted>
            {system.refrigerant} · outdoor unit {system.outdoorModel ?? 'not set'} · {system.unitCount} indoor unit{system.unitCount === 1 ? '' : 's'}
          </AppText>
          <AppText variant="small" muted>
            Factory charge {mass(system.factoryCharge)} · field-added {mass(system.fieldCharge)} · total {mass(system.totalCharge)}
          </AppText>
          <AppText variant="small" muted testID={`system-company-${system.name}`}>
            Test records by {companies.data?.find((c) => c.id === system.companyId)?.name ?? (system.companyId ? 'a company on the job' : "the job's mechanical companies")} ·{' '}
            <Link href={links.tests(job.id, { systemId: system.id })} testID={`system-tests-${system.name}`}>
              <AppText variant="small" style={{ color: colors.spruce, textDecorationLine: 'underline' }}>
                test records →
              </AppText>
            </Link>
          </AppText>
        </View>
        <View style={styles.actions}>
          <Button
            testID={`system-check-${system.name}`}
            label={open ? 'Hide check' : 'Refrigerant check'}
            tone="secondary"
            onPress={() => setOpen((o) => !o)}
          />
          {editor ? <Button label="Edit" tone="quiet" aria-label={`Edit system ${system.name}`} testID={`system-edit-${system.name}`} onPress={() => setEditing(true)} /> : null}
          {editor ? (
            <Button
              label="Delete"
              aria-label={`Delete system ${system.name}`}
              tone="quiet"
              busy={remove.isPending}
              onPress={() => {
                setError(null);
                remove.mutate(system, { onError: (err) => setError(writeErrorMessage(err)) });
              }}
            />
          ) : null}
        </View>
      </View>
      {error ? <Notice tone="error">{error}</Notice> : null}
      {open ? (
        detail.isPending ? (
          <LoadingState label="Checking the refrigerant charge…" />
        ) : detail.isError ? (
          <ErrorState message={detail.error.message} onRetry={() => detail.refetch()} />
        ) : (
          <ConcentrationResultView detail={detail.data} unitSystem={job.unitSystem} />
        )
      ) : null}
    </Card>
  );
}

const FIELDS = [
  'name',
  'outdoorModel',
  'refrigerant',
  'factoryCharge',
  'fieldCharge',
  'concentrationLimitOverride.value',
  'concentrationLimitOverride.unit',
  'concentrationLimitOverride.source',
  'companyId',
] as const;

/** The limit as typed: value as text; value and source both empty mean no override (null). */
interface OverrideDraft {
  value: string;
  unit: ConcentrationOverride['unit'];
  source: string;
}
type CreateSystemParsed = z.output<typeof createSystemSchema>;
type SystemFormValues = Omit<CreateSystemInput, 'concentrationLimitOverride'> & { concentrationLimitOverride: OverrideDraft };

const systemResolver = preparedFor<SystemFormValues, CreateSystemInput, unknown, CreateSystemParsed>(
  zodResolver(createSystemSchema),
  ({ concentrationLimitOverride: o, ...values }) => ({
    ...values,
    concentrationLimitOverride: o.value.trim() === '' && o.source.trim() === '' ? null : { value: Number(o.value), unit: o.unit, source: o.source },
  }),
);

function massText(kg: number | null, job: JobDetail): string | null {
  return kg === null ? null : formatQuantity(kg, 'mass', job.unitSystem);
}

function SystemForm({ job, existing, onDone }: { job: JobDetail; existing?: SystemDto; onDone: () => void }) {
  const wide = useWide();
  const create = useCreateSystemMutation(job.id);
  const update = useUpdateSystemMutation(job.id);
  const companies = useJobCompaniesQuery(job.id);
  const metric = job.unitSystem === 'metric';
  const { control, handleSubmit, setError, watch } = useForm<SystemFormValues, unknown, CreateSystemParsed>({
    resolver: systemResolver,
    defaultValues: {
      name: existing?.name ?? '',
      outdoorModel: existing?.outdoorModel ?? null,
      refrigerant: existing?.refrigerant ?? 'R-410A',
      factoryCharge: existing ? massText(existing.factoryCharge, job) : null,
      fieldCharge: existing ? massText(existing.fieldCharge, job) : null,
      companyId: existing?.companyId ?? null,
      concentrationLimitOverride: {
        value: existing?.concentrationLimitOverride ? String(existing.concentrationLimitOverride.value) : '',
        unit: existing?.concentrationLimitOverride?.unit ?? (metric ? 'g/m³' : 'lb/Mcf'),
        source: existing?.concentrationLimitOverride?.source ?? '',
      },
    },
  });
  const refrigerant = watch('refrigerant') as Refrigerant;
  const stored = pickConcentrationLimit(refrigerant, job.codeEditions);

  const submit = handleSubmit(async (input) => {
    try {
      if (existing) await update.mutateAsync({ system: existing, input });
      else await create.mutateAsync(input);
      onDone();
    } catch (err) {
      showServerErrors(err, setError, FIELDS, { duplicate: 'name' });
    }
  });

  return (
    <Card testID={existing ? `system-form-${existing.name}` : 'system-form'}>
      <AppText variant="heading">{existing ? `Edit ${existing.name}` : 'New system'}</AppText>
      <FormBanner control={control} testID="system-form-error" />
      <View style={wide ? styles.pair : null}>
        <View style={styles.cell}>
          <FormText control={control} name="name" label="System name" testID="system-name-input" placeholder="e.g. VRF-3 (north)" />
        </View>
        <View style={styles.cell}>
          <FormText control={control} name="outdoorModel" label="Outdoor unit model (optional)" testID="system-outdoor-input" nullable />
        </View>
      </View>
      <FormSelect
        control={control}
        name="refrigerant"
        label="Refrigerant"
        testID="system-refrigerant-input"
        options={REFRIGERANTS.map((r) => ({ value: r, label: r }))}
      />
      <FormSelect
        control={control}
        name="companyId"
        label="Company responsible for its test records"
        testID="system-company-input"
        placeholder="The job's mechanical companies"
        nullable
        options={(companies.data ?? []).map((c) => ({ value: c.id, label: c.name }))}
        hint="Its members record the pressure test, evacuation, charge, drain and start-up records of this system; left empty, every mechanical company on the job does."
      />
      <View style={wide ? styles.pair : null}>
        <View style={styles.cell}>
          <FormQuantity
            control={control}
            name="factoryCharge"
            label="Factory charge"
            testID="system-factory-input"
            units={['lb', 'kg']}
            defaultUnit={metric ? 'kg' : 'lb'}
            hint="From the outdoor unit's nameplate: 38 lb, 12 lb 6 oz or 17.2 kg."
          />
        </View>
        <View style={styles.cell}>
          <FormQuantity
            control={control}
            name="fieldCharge"
            label="Field-added charge"
            testID="system-field-input"
            units={['lb', 'kg']}
            defaultUnit={metric ? 'kg' : 'lb'}
            hint="Added on site for the line lengths."
          />
        </View>
      </View>
      <View style={styles.override}>
        <AppText variant="label">Concentration limit</AppText>
        <AppText variant="small" muted testID="system-limit-note">
          {stored
            ? `Trimout holds ${stored.lbPerMcf} lb/Mcf (${stored.gPerM3} g/m³) for ${refrigerant} from ${stored.document}, ${stored.section}. Enter a limit below only to use a different one.`
            : `Trimout holds no confirmed published limit for ${refrigerant}. Enter the limit your code edition gives, with its source, or the check stays "limit not set".`}
        </AppText>
        <View style={wide ? styles.pair : null}>
          <View style={styles.cell}>
            <FormText control={control} name="concentrationLimitOverride.value" label="Limit (optional)" testID="system-limit-value" inputMode="decimal" />
          </View>
          <View style={styles.cell}>
            <FormSelect
              control={control}
              name="concentrationLimitOverride.unit"
              label="Limit unit"
              testID="system-limit-unit"
              options={CONCENTRATION_LIMIT_UNITS.map((u) => ({ value: u, label: u }))}
            />
          </View>
        </View>
        <FormText control={control} name="concentrationLimitOverride.source" label="Limit source (document, edition, table)" testID="system-limit-source" />
      </View>
      <View style={styles.actions}>
        <Button testID="system-submit" label={existing ? 'Save system' : 'Add system'} onPress={submit} busy={create.isPending || update.isPending} />
        <Button label="Cancel" tone="quiet" onPress={onDone} />
      </View>
    </Card>
  );
}

const styles = StyleSheet.create({
  nameRow: { flexDirection: 'row', flexWrap: 'wrap', alignItems: 'center', gap: space.sm },
  body: { gap: space.lg },
  start: { alignSelf: 'flex-start' },
  list: { gap: space.md },
  cardHead: { flexDirection: 'row', flexWrap: 'wrap', gap: space.md, alignItems: 'flex-start' },
  grow: { flexGrow: 1, flexShrink: 1, flexBasis: 260, minWidth: 0, gap: 2 },
  actions: { flexDirection: 'row', flexWrap: 'wrap', gap: space.xs, alignItems: 'center' },
  pair: { flexDirection: 'row', gap: space.lg },
  cell: { flex: 1, minWidth: 0 },
  override: { gap: space.xs, borderTopWidth: 1, borderTopColor: colors.line, paddingTop: space.md, marginBottom: space.md, borderRadius: radius.sm },
});
