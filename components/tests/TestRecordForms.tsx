/**
 * One form per kind of test record (pressure test, evacuation, charge record, drain test, start-up
 * record): react-hook-form + zodResolver with the shared request schemas, figures typed the way the
 * trade writes them (a bare number takes the unit chosen beside it), photos beside the JSON. Every
 * form sends through useRecordSubmit (the outbox, one Idempotency-Key per press).
 */
import { zodResolver } from '@hookform/resolvers/zod';
import { useMemo } from 'react';
import { useFieldArray, useForm, type Resolver } from 'react-hook-form';
import { StyleSheet, View } from 'react-native';
import type { z } from 'zod';
import { evaluatePressureTest, parseGaugePressure, parseTemperature, STANDARD_ATMOSPHERE_PA, DEFAULT_ATMOSPHERE_SOURCE, paToGauge } from '../../shared/calc/testRecords';
import type { JobDetail, LevelDto, SystemDto, UnitDto } from '../../shared/schemas/setup';
import {
  chargeInputSchema,
  CONCEALED_UNIT_KINDS,
  drainTestInputSchema,
  evacuationInputSchema,
  pressureTestInputSchema,
  startupInputSchema,
  TEST_NOTE_LIMIT,
  type CreateTestRecordInput,
  type TestMedium,
  type TestRecordDto,
  type TestRecordKind,
} from '../../shared/schemas/testRecords';
import { unitKindLabel } from '../../shared/words';
import type { PickedPhoto } from '../findings/PhotoPicker.types';
import type { RecordedTest, StagedPhoto } from '../queries/testRecords';
import { colors, space } from '../theme';
import { AppText } from '../ui/AppText';
import { Button } from '../ui/Button';
import { Card } from '../ui/Card';
import { FormBanner } from '../ui/FormBanner';
import { FormChips, FormPhotos, FormQuantity, FormSegmented, FormSelect, FormText, preparedFor, withFormOnly } from '../ui/FormFields';
import { figure, instantToLocal, kindLabel, localToInstant, signed, duration } from './format';
import { FormYesNo, TestCaution } from './parts';
import { useRecordSubmit } from './useRecordSubmit';

const PRESSURE_UNITS = ['psi', 'kPa', 'bar', 'MPa'] as const;
const TEMPERATURE_UNITS = ['°C', '°F'] as const;
const VACUUM_UNITS = ['microns', 'Pa', 'mbar', 'torr', 'inHg vacuum'] as const;
const MEDIUM_OPTIONS: { value: TestMedium; label: string }[] = [
  { value: 'nitrogen', label: 'Nitrogen' },
  { value: 'nitrogen_with_trace_gas', label: 'Nitrogen with trace gas' },
  { value: 'dry_air', label: 'Dry air' },
  { value: 'other', label: 'Other' },
];
/** At most 10 photos per record (the server's limit), shared between a form's photo fields. */
const GAUGE_PHOTOS = 3;
const OTHER_PHOTOS = 4;

export interface TestFormProps {
  job: JobDetail;
  kind: TestRecordKind;
  systems: readonly SystemDto[];
  /** The job's units (drain tests pick one; start-up records list a system's). */
  units: readonly UnitDto[];
  levels: readonly LevelDto[];
  systemId?: string;
  unitId?: string;
  /** A drain test opened from a level: its units are offered first. */
  levelId?: string;
  /** The witnessed record this one corrects: its figures are the starting point. */
  supersedes?: TestRecordDto;
  onRecorded: (record: RecordedTest) => void;
  onCancel?: () => void;
  testID?: string;
}

/** The form for a kind of record. */
export function TestRecordForm(props: TestFormProps) {
  switch (props.kind) {
    case 'pressure':
      return <PressureForm {...props} />;
    case 'evacuation':
      return <EvacuationForm {...props} />;
    case 'charge':
      return <ChargeForm {...props} />;
    case 'drain':
      return <DrainForm {...props} />;
    case 'startup':
      return <StartupForm {...props} />;
  }
}

// ------------------------------------------------------------------------------------------------
// Shared parts

const none = () => undefined;
const staged = (photos: readonly PickedPhoto[], stage: StagedPhoto['stage']): StagedPhoto[] => photos.map((p) => ({ ...p, stage }));
const blankToUndefined = (s: string | undefined | null) => (s && s.trim() ? s : undefined);

function systemOptions(systems: readonly SystemDto[]) {
  return [...systems].sort((a, b) => a.name.localeCompare(b.name)).map((s) => ({ value: s.id, label: s.name }));
}

/** Where the record is for, the correction it is, and the caution: the head of every form. */
function FormHead({ kind, subject, supersedes, testID }: { kind: TestRecordKind; subject: string | null; supersedes?: TestRecordDto; testID: string }) {
  return (
    <>
      <Card>
        <AppText variant="small" muted>
          {supersedes ? 'Correction' : 'New record'}
          {subject ? ` · ${subject}` : ''}
        </AppText>
        <AppText variant="heading" testID={`${testID}-kind`}>
          {kindLabel(kind)}
        </AppText>
        {supersedes ? (
          <AppText variant="small" testID={`${testID}-corrects`}>
            This record replaces the one of {new Date(supersedes.recordedAt).toISOString().slice(0, 10)} by {supersedes.recordedBy.name}. Both stay in the history.
          </AppText>
        ) : null}
      </Card>
      <TestCaution kind={kind} initiallyOpen testID={`${testID}-caution`} />
    </>
  );
}

interface CommonValues {
  note: string;
  photos: PickedPhoto[];
}

function NoteAndPhotos({ control, testID, photoLabel = 'Other photos' }: { control: never; testID: string; photoLabel?: string }) {
  return (
    <>
      <FormText control={control} name="note" label="Note (optional)" testID={`${testID}-note`} limit={TEST_NOTE_LIMIT} multiline numberOfLines={3} style={styles.note} compact />
      <FormPhotos control={control} name="photos" label={photoLabel} testID={`${testID}-other`} max={OTHER_PHOTOS} tooMany={`At most ${OTHER_PHOTOS} photos here.`} />
    </>
  );
}

function Submit({ label, busy, onPress, onCancel, testID }: { label: string; busy: boolean; onPress: () => void; onCancel?: () => void; testID: string }) {
  return (
    <>
      <Button label={label} testID={`${testID}-submit`} busy={busy} onPress={onPress} />
      {onCancel ? <Button label="Cancel" tone="quiet" testID={`${testID}-cancel`} onPress={onCancel} /> : null}
    </>
  );
}

// ------------------------------------------------------------------------------------------------
// Pressure test

type PressureInput = z.input<typeof pressureTestInputSchema>;
type PressureValues = Omit<PressureInput, 'section' | 'levelIds' | 'note' | 'medium'> &
  CommonValues & { section: string; levelIds: string[]; medium: TestMedium | undefined; gaugeStart: PickedPhoto[]; gaugeEnd: PickedPhoto[] };
type PressureParsed = z.output<typeof pressureTestInputSchema> & { photos: PickedPhoto[]; gaugeStart: PickedPhoto[]; gaugeEnd: PickedPhoto[] };

function preparePressure(timeZone: string) {
  return (v: Omit<PressureValues, 'photos' | 'gaugeStart' | 'gaugeEnd'>): PressureInput => ({
    ...v,
    medium: v.medium as TestMedium,
    section: blankToUndefined(v.section),
    levelIds: v.levelIds.length ? v.levelIds : undefined,
    startAt: localToInstant(v.startAt, timeZone),
    endAt: localToInstant(v.endAt, timeZone),
    note: blankToUndefined(v.note),
  });
}

/**
 * The figures as typed so far, computed the way the server will (the record page shows the
 * server's): change as read beside the change corrected for temperature, the hold, pass or fail.
 */
export function pressurePreview(v: Partial<Pick<PressureValues, 'startPressure' | 'endPressure' | 'startTemperature' | 'endTemperature' | 'startAt' | 'endAt'>> & { resolution?: string; target?: string }, job: Pick<JobDetail, 'timeZone' | 'testSettings'>) {
  const start = parseGaugePressure(v.startPressure ?? '');
  const end = parseGaugePressure(v.endPressure ?? '');
  const t1 = parseTemperature(v.startTemperature ?? '');
  const t2 = parseTemperature(v.endTemperature ?? '');
  const res = parseGaugePressure(v.resolution ?? '');
  if (!start.ok || !end.ok || !t1.ok || !t2.ok || !res.ok) return null;
  const startAt = Date.parse(localToInstant(v.startAt ?? '', job.timeZone));
  const endAt = Date.parse(localToInstant(v.endAt ?? '', job.timeZone));
  const s = job.testSettings ?? {};
  const target = parseGaugePressure(v.target ?? '');
  const r = evaluatePressureTest({
    startGaugePa: start.value.pa,
    endGaugePa: end.value.pa,
    startKelvin: t1.value.kelvin,
    endKelvin: t2.value.kelvin,
    startAt: new Date(Number.isNaN(startAt) ? 0 : startAt),
    endAt: new Date(Number.isNaN(endAt) ? 0 : endAt),
    atmosphericPa: s.atmosphericPressure ? { value: s.atmosphericPressure.value, source: s.atmosphericPressure.source, from: 'job' } : { value: STANDARD_ATMOSPHERE_PA, source: DEFAULT_ATMOSPHERE_SOURCE, from: 'default' },
    gaugeResolutionPa: res.value.pa,
    allowedDropPa: s.allowedPressureDrop ? { value: s.allowedPressureDrop.value, source: s.allowedPressureDrop.source, from: 'job' } : null,
    targetPa: target.ok ? { value: target.value.pa, source: '', from: 'record' } : null,
    minHoldMinutes: s.minPressureHold ? { value: s.minPressureHold.value, source: s.minPressureHold.source, from: 'job' } : null,
  });
  const unit = start.value.unit;
  const inUnit = (pa: number) => `${signed(paToGauge(pa, unit), 2)} ${unit}`;
  const timesKnown = !Number.isNaN(startAt) && !Number.isNaN(endAt);
  return {
    uncorrected: inUnit(r.uncorrectedChangePa),
    corrected: inUnit(r.correctedChangePa),
    allowed: `${figure(paToGauge(r.allowedDrop.value, unit), 2)} ${unit}`,
    allowedSource: r.allowedDrop.source,
    hold: timesKnown && r.holdMinutes > 0 ? duration(r.holdMinutes) : null,
    // Without both times the hold is not known yet: no verdict.
    passed: timesKnown ? r.passed : null,
    reasons: timesKnown ? r.reasons : [],
  };
}

function PressureForm({ job, systems, units, levels, systemId, supersedes, onRecorded, onCancel, testID = 'test-form' }: TestFormProps) {
  const was = supersedes?.kind === 'pressure' ? supersedes.data : null;
  const metric = job.unitSystem === 'metric';
  const resolver = useMemo(
    () =>
      withFormOnly(preparedFor(zodResolver(pressureTestInputSchema), preparePressure(job.timeZone)) as unknown as Resolver<Omit<PressureValues, 'photos' | 'gaugeStart' | 'gaugeEnd'>, unknown, z.output<typeof pressureTestInputSchema>>, {
        photos: none,
        gaugeStart: none,
        gaugeEnd: none,
      }) as unknown as Resolver<PressureValues, unknown, PressureParsed>,
    [job.timeZone],
  );
  const { control, handleSubmit, setError, watch } = useForm<PressureValues, unknown, PressureParsed>({
    resolver,
    defaultValues: {
      kind: 'pressure',
      systemId: was?.systemId ?? systemId ?? '',
      section: was?.section ?? '',
      levelIds: was?.levelIds ?? [],
      medium: was?.medium ?? 'nitrogen',
      targetPressure: was?.targetPressure ?? { value: '', source: '' },
      startPressure: was?.startPressure ?? '',
      endPressure: was?.endPressure ?? '',
      startTemperature: was?.startTemperature ?? '',
      endTemperature: was?.endTemperature ?? '',
      startAt: was ? instantToLocal(was.startAt, job.timeZone) : '',
      endAt: was ? instantToLocal(was.endAt, job.timeZone) : instantToLocal(new Date(), job.timeZone),
      gauge: was?.gauge ?? { identifier: '', calibratedOn: '', resolution: '' },
      ...(supersedes ? { supersedesId: supersedes.id } : {}),
      note: '',
      photos: [],
      gaugeStart: [],
      gaugeEnd: [],
    },
  });
  const chosen = watch('systemId');
  const system = systems.find((s) => s.id === chosen);
  const { send, pending } = useRecordSubmit({ jobId: job.id, label: `${kindLabel('pressure')}${system ? ` · ${system.name}` : ''}`, setError, watch, onRecorded });
  const systemLevels = useMemo(() => {
    const on = new Set(units.filter((u) => u.systemId === chosen).map((u) => u.levelId));
    return levels.filter((l) => on.has(l.id)).map((l) => ({ value: l.id, label: l.name }));
  }, [units, levels, chosen]);
  const [sp, ep, st, et, sa, ea, resolution, target] = [
    watch('startPressure'),
    watch('endPressure'),
    watch('startTemperature'),
    watch('endTemperature'),
    watch('startAt'),
    watch('endAt'),
    watch('gauge.resolution'),
    watch('targetPressure.value'),
  ];
  const preview = pressurePreview({ startPressure: sp, endPressure: ep, startTemperature: st, endTemperature: et, startAt: sa, endAt: ea, resolution, target }, job);
  const photoCount = watch('gaugeStart').length + watch('gaugeEnd').length + watch('photos').length;
  const submit = handleSubmit(
    ({ photos, gaugeStart, gaugeEnd, ...input }) => send(input as CreateTestRecordInput, [...staged(gaugeStart, 'gauge_start'), ...staged(gaugeEnd, 'gauge_end'), ...staged(photos, 'test')]),
    () => setError('root', { message: 'Check the fields marked below.' }),
  );
  const pressureUnit = metric ? 'kPa' : 'psi';
  const tempUnit = metric ? '°C' : '°F';
  const c = control as never;
  return (
    <View style={styles.form} testID={testID}>
      <FormHead kind="pressure" subject={system?.name ?? null} supersedes={supersedes} testID={testID} />
      {systemId || supersedes ? null : (
        <FormSelect control={control} name="systemId" label="System" testID={`${testID}-system`} placeholder="Choose the system" options={systemOptions(systems)} compact />
      )}
      <FormText control={control} name="section" label="Part of the pipework tested (leave empty: the whole system)" testID={`${testID}-section`} placeholder="e.g. Branch B, risers 3–4" compact />
      {systemLevels.length > 1 ? (
        <FormChips control={control} name="levelIds" label="Levels the tested part covers (none chosen: every level of the system)" testID={`${testID}-levels`} options={systemLevels} />
      ) : null}
      <FormSegmented control={control} name="medium" label="Test medium" testID={`${testID}-medium`} options={MEDIUM_OPTIONS} />

      <Card>
        <AppText variant="label">Target test pressure</AppText>
        <FormQuantity control={c} name="targetPressure.value" label="Target (gauge)" testID={`${testID}-target`} units={PRESSURE_UNITS} defaultUnit={pressureUnit} />
        <FormText
          control={control}
          name="targetPressure.source"
          label="Where the target comes from"
          testID={`${testID}-target-source`}
          placeholder="e.g. Outdoor unit manual p. 31"
          hint="The manufacturer’s manual and page, or the code section the job follows."
          compact
        />
      </Card>

      <Card>
        <AppText variant="label">Start</AppText>
        <FormQuantity control={c} name="startPressure" label="Gauge pressure at the start" testID={`${testID}-start-pressure`} units={PRESSURE_UNITS} defaultUnit={pressureUnit} />
        <FormQuantity control={c} name="startTemperature" label="Temperature at the start" testID={`${testID}-start-temperature`} units={TEMPERATURE_UNITS} defaultUnit={tempUnit} />
        <FormText control={control} name="startAt" label="Start time (job’s clock)" testID={`${testID}-start-at`} placeholder="2026-12-01 08:00" hint={`Date and time, ${job.timeZone}.`} compact />
        <FormPhotos control={control} name="gaugeStart" label="Gauge at the start" testID={`${testID}-gauge-start`} max={GAUGE_PHOTOS} tooMany={`At most ${GAUGE_PHOTOS} photos of the gauge at the start.`} photoLabel="Gauge at the start" />
      </Card>

      <Card>
        <AppText variant="label">End</AppText>
        <FormQuantity control={c} name="endPressure" label="Gauge pressure at the end" testID={`${testID}-end-pressure`} units={PRESSURE_UNITS} defaultUnit={pressureUnit} />
        <FormQuantity control={c} name="endTemperature" label="Temperature at the end" testID={`${testID}-end-temperature`} units={TEMPERATURE_UNITS} defaultUnit={tempUnit} />
        <FormText control={control} name="endAt" label="End time (job’s clock)" testID={`${testID}-end-at`} placeholder="2026-12-02 08:00" hint={`Date and time, ${job.timeZone}.`} compact />
        <FormPhotos control={control} name="gaugeEnd" label="Gauge at the end" testID={`${testID}-gauge-end`} max={GAUGE_PHOTOS} tooMany={`At most ${GAUGE_PHOTOS} photos of the gauge at the end.`} photoLabel="Gauge at the end" />
      </Card>

      <Card>
        <AppText variant="label">Gauge</AppText>
        <FormText control={control} name="gauge.identifier" label="Gauge identifier" testID={`${testID}-gauge-id`} placeholder="e.g. G-17" compact />
        <FormText control={control} name="gauge.calibratedOn" label="Calibrated on" testID={`${testID}-gauge-calibrated`} placeholder="YYYY-MM-DD" inputMode="numeric" compact />
        <FormQuantity control={c} name="gauge.resolution" label="Smallest step the gauge shows" testID={`${testID}-gauge-resolution`} units={PRESSURE_UNITS} defaultUnit={pressureUnit} />
      </Card>

      {preview ? (
        <View style={[styles.preview, preview.passed === false ? styles.fail : preview.passed ? styles.pass : null]} testID={`${testID}-preview`}>
          <AppText variant="label">As typed so far</AppText>
          <AppText testID={`${testID}-preview-changes`}>
            Change as read {preview.uncorrected} · corrected for temperature {preview.corrected}
          </AppText>
          <AppText variant="small">
            Allowed drop {preview.allowed} ({preview.allowedSource}){preview.hold ? ` · hold ${preview.hold}` : ''}
          </AppText>
          {preview.passed === null ? null : (
            <AppText variant="label" testID={`${testID}-preview-verdict`}>
              {preview.passed ? 'Would pass' : `Would fail: ${preview.reasons.join(' ')}`}
            </AppText>
          )}
        </View>
      ) : null}

      <NoteAndPhotos control={c} testID={testID} />
      <FormBanner control={control} testID={`${testID}-error`} />
      <Submit label={photoCount ? `Save pressure test with ${photoCount} photo${photoCount === 1 ? '' : 's'}` : 'Save pressure test'} busy={pending} onPress={submit} onCancel={onCancel} testID={testID} />
    </View>
  );
}

// ------------------------------------------------------------------------------------------------
// Evacuation

type EvacuationInput = z.input<typeof evacuationInputSchema>;
type EvacuationValues = Omit<EvacuationInput, 'holdMinutes' | 'note' | 'gaugeIdentifier'> & CommonValues & { holdMinutes: string; gaugeIdentifier: string };
type EvacuationParsed = z.output<typeof evacuationInputSchema> & { photos: PickedPhoto[] };

function prepareEvacuation(v: Omit<EvacuationValues, 'photos'>): EvacuationInput {
  const minutes = v.holdMinutes.trim() === '' ? undefined : Number(v.holdMinutes.trim().replace(/\s*min(utes?)?$/i, ''));
  return { ...v, holdMinutes: minutes as number, gaugeIdentifier: blankToUndefined(v.gaugeIdentifier), note: blankToUndefined(v.note) };
}

const evacuationResolver = withFormOnly(preparedFor(zodResolver(evacuationInputSchema), prepareEvacuation) as unknown as Resolver<Omit<EvacuationValues, 'photos'>, unknown, z.output<typeof evacuationInputSchema>>, {
  photos: none,
}) as unknown as Resolver<EvacuationValues, unknown, EvacuationParsed>;

function EvacuationForm({ job, systems, systemId, supersedes, onRecorded, onCancel, testID = 'test-form' }: TestFormProps) {
  const was = supersedes?.kind === 'evacuation' ? supersedes.data : null;
  const { control, handleSubmit, setError, watch } = useForm<EvacuationValues, unknown, EvacuationParsed>({
    resolver: evacuationResolver,
    defaultValues: {
      kind: 'evacuation',
      systemId: was?.systemId ?? systemId ?? '',
      deepestReading: was?.deepestReading ?? '',
      isolatedReading: was?.isolatedReading ?? '',
      afterHoldReading: was?.afterHoldReading ?? '',
      holdMinutes: was ? String(was.holdMinutes) : '',
      gaugeIdentifier: was?.gaugeIdentifier ?? '',
      ...(supersedes ? { supersedesId: supersedes.id } : {}),
      note: '',
      photos: [],
    },
  });
  const system = systems.find((s) => s.id === watch('systemId'));
  const { send, pending } = useRecordSubmit({ jobId: job.id, label: `${kindLabel('evacuation')}${system ? ` · ${system.name}` : ''}`, setError, watch, onRecorded });
  const submit = handleSubmit(
    ({ photos, ...input }) => send(input as CreateTestRecordInput, staged(photos, 'test')),
    () => setError('root', { message: 'Check the fields marked below.' }),
  );
  const c = control as never;
  const s = job.testSettings ?? {};
  return (
    <View style={styles.form} testID={testID}>
      <FormHead kind="evacuation" subject={system?.name ?? null} supersedes={supersedes} testID={testID} />
      {systemId || supersedes ? null : (
        <FormSelect control={control} name="systemId" label="System" testID={`${testID}-system`} placeholder="Choose the system" options={systemOptions(systems)} compact />
      )}
      <AppText variant="small" muted testID={`${testID}-limits`}>
        Target {s.targetVacuum ? `${s.targetVacuum.text} (${s.targetVacuum.source})` : '500 microns (common practice, not a code value; the manual governs)'} · rise over the hold at most{' '}
        {s.decayRiseLimit ? `${s.decayRiseLimit.text} (${s.decayRiseLimit.source})` : '500 microns (common practice, from memory)'}
        {' · '}hold at least {s.minDecayHold ? `${s.minDecayHold.text} (${s.minDecayHold.source})` : '10 min (common practice, from memory)'}.
      </AppText>
      <FormQuantity control={c} name="deepestReading" label="Deepest reading" testID={`${testID}-deepest`} units={VACUUM_UNITS} defaultUnit="microns" />
      <FormQuantity control={c} name="isolatedReading" label="Reading when the pump was isolated" testID={`${testID}-isolated`} units={VACUUM_UNITS} defaultUnit="microns" />
      <FormQuantity control={c} name="afterHoldReading" label="Reading after the hold" testID={`${testID}-after-hold`} units={VACUUM_UNITS} defaultUnit="microns" />
      <FormText control={control} name="holdMinutes" label="Hold (minutes)" testID={`${testID}-hold`} inputMode="decimal" placeholder="e.g. 15" compact />
      <FormText control={control} name="gaugeIdentifier" label="Vacuum gauge identifier (optional)" testID={`${testID}-gauge-id`} compact />
      <NoteAndPhotos control={c} testID={testID} photoLabel="Photos (gauge readings)" />
      <FormBanner control={control} testID={`${testID}-error`} />
      <Submit label="Save evacuation" busy={pending} onPress={submit} onCancel={onCancel} testID={testID} />
    </View>
  );
}

// ------------------------------------------------------------------------------------------------
// Charge record

type ChargeInput = z.input<typeof chargeInputSchema>;
type ChargeValues = Omit<ChargeInput, 'note' | 'scaleIdentifier'> & CommonValues & { scaleIdentifier: string };
type ChargeParsed = z.output<typeof chargeInputSchema> & { photos: PickedPhoto[] };

const chargeResolver = withFormOnly(
  preparedFor(zodResolver(chargeInputSchema), (v: Omit<ChargeValues, 'photos'>): ChargeInput => ({ ...v, scaleIdentifier: blankToUndefined(v.scaleIdentifier), note: blankToUndefined(v.note) })) as unknown as Resolver<
    Omit<ChargeValues, 'photos'>,
    unknown,
    z.output<typeof chargeInputSchema>
  >,
  { photos: none },
) as unknown as Resolver<ChargeValues, unknown, ChargeParsed>;

function ChargeForm({ job, systems, systemId, supersedes, onRecorded, onCancel, testID = 'test-form' }: TestFormProps) {
  const was = supersedes?.kind === 'charge' ? supersedes.data : null;
  const metric = job.unitSystem === 'metric';
  const { control, handleSubmit, setError, watch } = useForm<ChargeValues, unknown, ChargeParsed>({
    resolver: chargeResolver,
    defaultValues: {
      kind: 'charge',
      systemId: was?.systemId ?? systemId ?? '',
      liquidLines: was?.liquidLines ?? [{ size: '', length: '' }],
      weighedIn: was?.weighedIn ?? '',
      scaleIdentifier: was?.scaleIdentifier ?? '',
      ...(supersedes ? { supersedesId: supersedes.id } : {}),
      note: '',
      photos: [],
    },
  });
  const lines = useFieldArray({ control, name: 'liquidLines' });
  const system = systems.find((s) => s.id === watch('systemId'));
  const { send, pending } = useRecordSubmit({ jobId: job.id, label: `${kindLabel('charge')}${system ? ` · ${system.name}` : ''}`, setError, watch, onRecorded });
  const submit = handleSubmit(
    ({ photos, ...input }) => send(input as CreateTestRecordInput, staged(photos, 'test')),
    () => setError('root', { message: 'Check the fields marked below.' }),
  );
  const factors = system?.chargeBasis?.factors ?? [];
  const c = control as never;
  return (
    <View style={styles.form} testID={testID}>
      <FormHead kind="charge" subject={system?.name ?? null} supersedes={supersedes} testID={testID} />
      {systemId || supersedes ? null : (
        <FormSelect control={control} name="systemId" label="System" testID={`${testID}-system`} placeholder="Choose the system" options={systemOptions(systems)} compact />
      )}
      {system ? (
        <AppText variant="small" muted testID={`${testID}-factors`}>
          {factors.length
            ? `Additional charge per size, from the outdoor unit’s manual: ${factors.map((f) => `${f.size} ${f.text} (${f.source})`).join('; ')}.`
            : 'No additional-charge factors are entered on this system yet: the additional charge stays unknown until a GC manager enters them from the outdoor unit’s manual. Trimout never invents one.'}
        </AppText>
      ) : null}
      {lines.fields.map((f, i) => (
        <Card key={f.id} testID={`${testID}-line-${i}`}>
          <AppText variant="label">Liquid line {i + 1}</AppText>
          <FormText control={control} name={`liquidLines.${i}.size`} label="Pipe size, as the manual names it" testID={`${testID}-line-${i}-size`} placeholder={factors[0]?.size ?? '3/8"'} compact />
          <FormQuantity control={c} name={`liquidLines.${i}.length`} label="Length" testID={`${testID}-line-${i}-length`} units={['ft', 'm']} defaultUnit={metric ? 'm' : 'ft'} />
          {lines.fields.length > 1 ? <Button label="Remove this line" tone="quiet" testID={`${testID}-line-${i}-remove`} onPress={() => lines.remove(i)} /> : null}
        </Card>
      ))}
      {lines.fields.length < 20 ? <Button label="Add a pipe size" tone="secondary" testID={`${testID}-line-add`} onPress={() => lines.append({ size: '', length: '' })} /> : null}
      <FormQuantity control={c} name="weighedIn" label="Refrigerant weighed in" testID={`${testID}-weighed`} units={['lb', 'kg']} defaultUnit={metric ? 'kg' : 'lb'} hint="Type a number and pick its unit, or type it as weighed (12 lb 6 oz)." />
      <FormText control={control} name="scaleIdentifier" label="Scale identifier (optional)" testID={`${testID}-scale`} compact />
      <NoteAndPhotos control={c} testID={testID} photoLabel="Photos (scale, cylinder)" />
      <FormBanner control={control} testID={`${testID}-error`} />
      <Submit label="Save charge record" busy={pending} onPress={submit} onCancel={onCancel} testID={testID} />
    </View>
  );
}

// ------------------------------------------------------------------------------------------------
// Drain test

type DrainInput = z.input<typeof drainTestInputSchema>;
type Answer = boolean | null;
type DrainValues = Omit<DrainInput, 'note' | 'waterAmount' | 'waterPoured' | 'reachesTermination' | 'pumpFitted' | 'floatSwitchFitted' | 'noLeakAtJoints'> &
  CommonValues & {
    waterAmount: string;
    waterPoured: Answer;
    reachesTermination: Answer;
    pumpFitted: Answer;
    floatSwitchFitted: Answer;
    noLeakAtJoints: Answer;
  };
type DrainParsed = z.output<typeof drainTestInputSchema> & { photos: PickedPhoto[] };

function prepareDrain(v: Omit<DrainValues, 'photos'>): DrainInput {
  return {
    ...(v as unknown as DrainInput),
    waterAmount: blankToUndefined(v.waterAmount),
    // Nothing fitted: nothing to prove (the schema refuses an answer about a part that is not there).
    pumpRunsAndLifts: v.pumpFitted ? v.pumpRunsAndLifts : null,
    floatSwitchStopsUnit: v.floatSwitchFitted ? v.floatSwitchStopsUnit : null,
    note: blankToUndefined(v.note),
  };
}

const drainResolver = withFormOnly(preparedFor(zodResolver(drainTestInputSchema), prepareDrain) as unknown as Resolver<Omit<DrainValues, 'photos'>, unknown, z.output<typeof drainTestInputSchema>>, {
  photos: none,
}) as unknown as Resolver<DrainValues, unknown, DrainParsed>;

function DrainForm({ job, units, unitId, levelId, supersedes, onRecorded, onCancel, testID = 'test-form' }: TestFormProps) {
  const was = supersedes?.kind === 'drain' ? supersedes.data : null;
  const { control, handleSubmit, setError, watch } = useForm<DrainValues, unknown, DrainParsed>({
    resolver: drainResolver,
    defaultValues: {
      kind: 'drain',
      unitId: was?.unitId ?? unitId ?? '',
      waterPoured: was?.waterPoured ?? null,
      waterAmount: was?.waterAmount ?? '',
      reachesTermination: was?.reachesTermination ?? null,
      pumpFitted: was?.pumpFitted ?? null,
      pumpRunsAndLifts: was?.pumpRunsAndLifts ?? null,
      floatSwitchFitted: was?.floatSwitchFitted ?? null,
      floatSwitchStopsUnit: was?.floatSwitchStopsUnit ?? null,
      noLeakAtJoints: was?.noLeakAtJoints ?? null,
      ...(supersedes ? { supersedesId: supersedes.id } : {}),
      note: '',
      photos: [],
    },
  });
  const unit = units.find((u) => u.id === watch('unitId'));
  const { send, pending } = useRecordSubmit({ jobId: job.id, label: `${kindLabel('drain')}${unit ? ` · unit ${unit.tag}` : ''}`, setError, watch, onRecorded });
  const [pump, float] = [watch('pumpFitted'), watch('floatSwitchFitted')];
  const submit = handleSubmit(
    ({ photos, ...input }) => {
      // A fitted pump or switch must be answered: left empty it would be recorded as not proven.
      let missing = false;
      if (input.pumpFitted && input.pumpRunsAndLifts == null) {
        setError('pumpRunsAndLifts', { message: 'Say yes or no: pump runs and lifts.' });
        missing = true;
      }
      if (input.floatSwitchFitted && input.floatSwitchStopsUnit == null) {
        setError('floatSwitchStopsUnit', { message: 'Say yes or no: the switch stops the unit.' });
        missing = true;
      }
      if (missing) return setError('root', { message: 'Check the fields marked below.' });
      return send(input as CreateTestRecordInput, staged(photos, 'test'));
    },
    () => setError('root', { message: 'Check the fields marked below.' }),
  );
  const options = useMemo(() => {
    const concealed = new Set<string>(CONCEALED_UNIT_KINDS);
    const here = levelId ? units.filter((u) => u.levelId === levelId) : units;
    return [...here]
      .sort((a, b) => Number(concealed.has(b.kind)) - Number(concealed.has(a.kind)) || a.tag.localeCompare(b.tag))
      .map((u) => ({ value: u.id, label: `${u.tag} · ${unitKindLabel(u.kind)} · ${u.levelName}` }));
  }, [units, levelId]);
  const c = control as never;
  return (
    <View style={styles.form} testID={testID}>
      <FormHead kind="drain" subject={unit ? `unit ${unit.tag}${unit.systemName ? ` · ${unit.systemName}` : ''}` : null} supersedes={supersedes} testID={testID} />
      {unitId || supersedes ? null : <FormSelect control={control} name="unitId" label="Unit" testID={`${testID}-unit`} placeholder="Choose the unit" options={options} compact />}
      <FormYesNo control={control} name="waterPoured" label="Water poured into the pan" testID={`${testID}-poured`} />
      <FormText control={control} name="waterAmount" label="How much water (optional)" testID={`${testID}-amount`} placeholder="e.g. 2 L, 1/2 gal" compact />
      <FormYesNo control={control} name="reachesTermination" label="Water reaches its termination" testID={`${testID}-termination`} />
      <FormYesNo control={control} name="pumpFitted" label="Condensate pump fitted" testID={`${testID}-pump`} />
      {pump ? <FormYesNo control={control} name="pumpRunsAndLifts" label="Pump runs and lifts" testID={`${testID}-pump-runs`} /> : null}
      <FormYesNo control={control} name="floatSwitchFitted" label="Overflow or float switch fitted" testID={`${testID}-float`} />
      {float ? <FormYesNo control={control} name="floatSwitchStopsUnit" label="The switch stops the unit" testID={`${testID}-float-stops`} /> : null}
      <FormYesNo control={control} name="noLeakAtJoints" label="No leak at joints" testID={`${testID}-no-leak`} />
      {pump || float ? (
        <AppText variant="small" muted>
          A pump or switch is proven with the unit powered: this test then counts toward the system’s acceptance, not its start-up.
        </AppText>
      ) : null}
      <NoteAndPhotos control={c} testID={testID} photoLabel="Photos" />
      <FormBanner control={control} testID={`${testID}-error`} />
      <Submit label="Save drain test" busy={pending} onPress={submit} onCancel={onCancel} testID={testID} />
    </View>
  );
}

// ------------------------------------------------------------------------------------------------
// Start-up record

type StartupInput = z.input<typeof startupInputSchema>;
type StartupRow = { unitId: string; tag: string; answers: Answer; address: string; addressed: Answer; faultShown: Answer; faultCode: string; supplyTemperature: string; returnTemperature: string };
type StartupValues = Omit<StartupInput, 'note' | 'units' | 'mode'> & CommonValues & { mode: StartupInput['mode'] | undefined; units: StartupRow[] };
type StartupParsed = z.output<typeof startupInputSchema> & { photos: PickedPhoto[] };

function prepareStartup(v: Omit<StartupValues, 'photos'>): StartupInput {
  return {
    ...v,
    mode: v.mode as StartupInput['mode'],
    note: blankToUndefined(v.note),
    units: v.units.map(({ tag: _tag, ...u }) => ({
      ...u,
      answers: u.answers as boolean,
      addressed: u.addressed as boolean,
      faultShown: u.faultShown as boolean,
      address: blankToUndefined(u.address),
      faultCode: u.faultShown ? blankToUndefined(u.faultCode) : undefined,
      supplyTemperature: blankToUndefined(u.supplyTemperature),
      returnTemperature: blankToUndefined(u.returnTemperature),
    })),
  };
}

const startupResolver = withFormOnly(preparedFor(zodResolver(startupInputSchema), prepareStartup) as unknown as Resolver<Omit<StartupValues, 'photos'>, unknown, z.output<typeof startupInputSchema>>, {
  photos: none,
}) as unknown as Resolver<StartupValues, unknown, StartupParsed>;

function rowsFor(units: readonly UnitDto[], systemId: string): StartupRow[] {
  return units
    .filter((u) => u.systemId === systemId)
    .sort((a, b) => a.tag.localeCompare(b.tag))
    .map((u) => ({ unitId: u.id, tag: u.tag, answers: null, address: '', addressed: null, faultShown: null, faultCode: '', supplyTemperature: '', returnTemperature: '' }));
}

function StartupForm({ job, systems, units, systemId, supersedes, onRecorded, onCancel, testID = 'test-form' }: TestFormProps) {
  const was = supersedes?.kind === 'startup' ? supersedes.data : null;
  const metric = job.unitSystem === 'metric';
  const first = was?.systemId ?? systemId ?? '';
  const tagOf = (id: string) => units.find((u) => u.id === id)?.tag ?? id;
  const { control, handleSubmit, setError, watch } = useForm<StartupValues, unknown, StartupParsed>({
    resolver: startupResolver,
    defaultValues: {
      kind: 'startup',
      systemId: first,
      mode: was?.mode ?? 'cooling',
      technician: was?.technician ?? '',
      units: was
        ? was.units.map((u) => ({
            unitId: u.unitId,
            tag: tagOf(u.unitId),
            answers: u.answers,
            address: u.address ?? '',
            addressed: u.addressed,
            faultShown: u.faultShown,
            faultCode: u.faultCode ?? '',
            supplyTemperature: u.supplyTemperature ?? '',
            returnTemperature: u.returnTemperature ?? '',
          }))
        : rowsFor(units, first),
      ...(supersedes ? { supersedesId: supersedes.id } : {}),
      note: '',
      photos: [],
    },
  });
  const rows = useFieldArray({ control, name: 'units' });
  const system = systems.find((s) => s.id === watch('systemId'));
  const { send, pending } = useRecordSubmit({ jobId: job.id, label: `${kindLabel('startup')}${system ? ` · ${system.name}` : ''}`, setError, watch, onRecorded });
  const submit = handleSubmit(
    ({ photos, ...input }) => send(input as CreateTestRecordInput, staged(photos, 'test')),
    () => setError('root', { message: 'Check the fields marked below.' }),
  );
  const c = control as never;
  const faults = watch('units').map((u) => u.faultShown);
  return (
    <View style={styles.form} testID={testID}>
      <FormHead kind="startup" subject={system?.name ?? null} supersedes={supersedes} testID={testID} />
      {systemId || supersedes ? null : (
        <FormSelect
          control={control}
          name="systemId"
          label="System"
          testID={`${testID}-system`}
          placeholder="Choose the system"
          options={systemOptions(systems)}
          onChosen={(id) => rows.replace(rowsFor(units, id))}
          compact
        />
      )}
      <FormSegmented
        control={control}
        name="mode"
        label="Mode tested"
        testID={`${testID}-mode`}
        options={[
          { value: 'cooling', label: 'Cooling' },
          { value: 'heating', label: 'Heating' },
          { value: 'fan', label: 'Fan' },
        ]}
      />
      <FormText control={control} name="technician" label="Technician" testID={`${testID}-technician`} compact />
      {rows.fields.length === 0 ? (
        <AppText muted testID={`${testID}-no-units`}>
          {system ? 'No indoor units on this system yet.' : 'Choose the system: its indoor units are listed here.'}
        </AppText>
      ) : null}
      {rows.fields.map((f, i) => (
        <Card key={f.id} testID={`${testID}-unit-${i}`}>
          <AppText variant="heading">Unit {f.tag}</AppText>
          <FormYesNo control={control} name={`units.${i}.answers`} label="Answers the controller" testID={`${testID}-unit-${i}-answers`} />
          <FormYesNo control={control} name={`units.${i}.addressed`} label="Addressed" testID={`${testID}-unit-${i}-addressed`} />
          <FormText control={control} name={`units.${i}.address`} label="Address shown (optional)" testID={`${testID}-unit-${i}-address`} placeholder="e.g. 1-03" compact />
          <FormYesNo control={control} name={`units.${i}.faultShown`} label="Fault shown" testID={`${testID}-unit-${i}-fault`} />
          {faults[i] ? <FormText control={control} name={`units.${i}.faultCode`} label="Fault code" testID={`${testID}-unit-${i}-fault-code`} compact /> : null}
          <FormQuantity control={c} name={`units.${i}.supplyTemperature`} label="Supply air temperature" testID={`${testID}-unit-${i}-supply`} units={TEMPERATURE_UNITS} defaultUnit={metric ? '°C' : '°F'} />
          <FormQuantity control={c} name={`units.${i}.returnTemperature`} label="Return air temperature" testID={`${testID}-unit-${i}-return`} units={TEMPERATURE_UNITS} defaultUnit={metric ? '°C' : '°F'} />
        </Card>
      ))}
      <NoteAndPhotos control={c} testID={testID} />
      <FormBanner control={control} testID={`${testID}-error`} />
      <Submit label="Save start-up record" busy={pending} onPress={submit} onCancel={onCancel} testID={testID} />
    </View>
  );
}

const styles = StyleSheet.create({
  form: { gap: space.lg },
  note: { minHeight: 88, paddingTop: space.sm, textAlignVertical: 'top' },
  preview: { borderRadius: 10, borderLeftWidth: 4, borderLeftColor: colors.ochre, backgroundColor: colors.ochreSoft, padding: space.md, gap: 4 },
  pass: { backgroundColor: colors.goodSoft, borderLeftColor: colors.good },
  fail: { backgroundColor: colors.dangerSoft, borderLeftColor: colors.danger },
});
