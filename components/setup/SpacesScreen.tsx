import { zodResolver } from '@hookform/resolvers/zod';
import { Link } from 'expo-router';
import { useState } from 'react';
import { Controller, useForm } from 'react-hook-form';
import { StyleSheet, View } from 'react-native';
import { formatQuantity } from '../../shared/calc/format';
import { createSpaceSchema, type JobDetail, type SpaceDto } from '../../shared/schemas/setup';
import { useLevelsQuery } from '../queries/levels';
import { PasteNames } from './PasteNames';
import { RoomImport } from './RoomImport';
import { useCreateSpaceMutation, useCreateSpacesMutation, useDeleteSpaceMutation, useSpacesQuery, useUpdateSpaceMutation } from '../queries/spaces';
import { colors, radius, space } from '../theme';
import { AppText } from '../ui/AppText';
import { Badge } from '../ui/Badge';
import { Button } from '../ui/Button';
import { Card } from '../ui/Card';
import { Chips } from '../ui/Chips';
import { Segmented } from '../ui/Segmented';
import { Select } from '../ui/Select';
import { EmptyState, ErrorState, LoadingState } from '../ui/States';
import { useWide } from '../ui/useWide';
import { FormBanner } from '../ui/FormBanner';
import { FormQuantity, FormSelect, FormText } from '../ui/FormFields';
import { writeErrorMessage } from '../api/writeErrors';
import { showServerErrors } from './formErrors';
import { links } from '../links';
import { SetupFrame, canEditSetup } from './SetupFrame';

export function SpacesScreen({ jobId }: { jobId: string }) {
  return (
    <SetupFrame
      jobId={jobId}
      section="spaces"
      title="Spaces"
      intro="Rooms and areas on each level. Floor area and ceiling height give the volume the refrigerant check uses."
      testID="spaces-screen"
    >
      {(job) => <SpacesBody job={job} />}
    </SetupFrame>
  );
}

function PasteSpaces({ jobId, levelId, levelName }: { jobId: string; levelId: string; levelName: string }) {
  const create = useCreateSpacesMutation(jobId);
  return (
    <PasteNames
      title={`Add several spaces to ${levelName}`}
      subject="a space name"
      max={120}
      noun={['space', 'spaces']}
      placeholder={'Exam 101\nExam 102\nStaff 103'}
      testID="spaces-paste"
      send={(names) => create.mutateAsync({ levelId, names })}
    />
  );
}

function SpacesBody({ job }: { job: JobDetail }) {
  const editor = canEditSetup(job);
  const levels = useLevelsQuery(job.id);
  const [picked, setPicked] = useState<string>('');
  const levelId = picked || levels.data?.[0]?.id || '';

  if (levels.isPending) return <LoadingState label="Loading levels…" />;
  if (levels.isError) return <ErrorState message={levels.error.message} onRetry={() => levels.refetch()} />;
  if (levels.data.length === 0) {
    // A room schedule brings its levels with it: the import is offered before any level exists.
    return (
      <View style={styles.body}>
        <EmptyState
          title="Add levels first"
          body={
            editor
              ? "Spaces belong to a level. Add the job's levels, then come back to add spaces on each, or import a room schedule below: its levels come with it."
              : "Spaces belong to a level. Add the job's levels, then come back to add spaces on each."
          }
          testID="spaces-no-levels"
          action={
            <Link href={links.setup(job.id, 'levels')} style={styles.link}>
              <AppText variant="label" style={{ color: colors.spruce }}>
                Go to levels →
              </AppText>
            </Link>
          }
        />
        {editor ? <RoomImport jobId={job.id} unitSystem={job.unitSystem} /> : null}
      </View>
    );
  }
  const level = levels.data.find((l) => l.id === levelId) ?? levels.data[0]!;
  return (
    <View style={styles.body}>
      <Select
        label="Level"
        testID="spaces-level"
        value={level.id}
        options={levels.data.map((l) => ({ value: l.id, label: `${l.position}. ${l.name}` }))}
        onChange={setPicked}
        compact
      />
      {editor ? <SpaceForm key={level.id} job={job} levelId={level.id} /> : null}
      {editor ? <PasteSpaces key={`paste-${level.id}`} jobId={job.id} levelId={level.id} levelName={level.name} /> : null}
      {editor ? <RoomImport jobId={job.id} unitSystem={job.unitSystem} /> : null}
      <SpaceList job={job} levelId={level.id} levelName={level.name} editor={editor} />
    </View>
  );
}

function SpaceList({ job, levelId, levelName, editor }: { job: JobDetail; levelId: string; levelName: string; editor: boolean }) {
  const spaces = useSpacesQuery(job.id, levelId);
  if (spaces.isPending) return <LoadingState label="Loading spaces…" />;
  if (spaces.isError) return <ErrorState message={spaces.error.message} onRetry={() => spaces.refetch()} />;
  if (spaces.data.length === 0) {
    return (
      <EmptyState
        title={`No spaces on ${levelName} yet`}
        body={editor ? 'Add the rooms and areas that have indoor units in them.' : 'The GC manager has not added spaces on this level.'}
        testID="spaces-empty"
      />
    );
  }
  return (
    <View style={styles.list} testID="spaces-list">
      {spaces.data.map((s) => (
        <SpaceRow key={s.id} job={job} space={s} editor={editor} />
      ))}
    </View>
  );
}

function SpaceRow({ job, space: s, editor }: { job: JobDetail; space: SpaceDto; editor: boolean }) {
  const [editing, setEditing] = useState(false);
  const remove = useDeleteSpaceMutation(job.id);
  const [error, setError] = useState<string | null>(null);
  const sys = job.unitSystem;
  if (editing) return <SpaceForm job={job} levelId={s.levelId} existing={s} onDone={() => setEditing(false)} />;
  return (
    <View style={styles.row} testID={`space-row-${s.name}`}>
      <View style={styles.grow}>
        <View style={styles.titleRow}>
          <AppText variant="heading">{s.name}</AppText>
          {s.occupancy === 'institutional' ? <Badge label="Institutional" tone="warn" /> : null}
          {!s.enclosed ? <Badge label="Not enclosed" tone="info" /> : null}
          {s.linkedSpaceIds.length > 0 ? (
            <Badge label={`Joined to ${s.linkedSpaceIds.length} space${s.linkedSpaceIds.length === 1 ? '' : 's'}`} tone="neutral" />
          ) : null}
        </View>
        <AppText variant="small" muted>
          Floor area {s.floorArea !== null ? formatQuantity(s.floorArea, 'area', sys) : 'not set'} · Ceiling{' '}
          {s.ceilingHeight !== null ? formatQuantity(s.ceilingHeight, 'length', sys) : 'not set'} · Volume{' '}
          {s.volume !== null ? formatQuantity(s.volume, 'volume', sys) : 'not known'} · {s.unitCount} unit{s.unitCount === 1 ? '' : 's'}
        </AppText>
        {error ? (
          <AppText variant="small" style={{ color: colors.danger }} role="alert">
            {error}
          </AppText>
        ) : null}
      </View>
      {editor ? (
        <View style={styles.actions}>
          <Button label="Edit" tone="quiet" aria-label={`Edit space ${s.name}`} testID={`space-edit-${s.name}`} onPress={() => setEditing(true)} />
          <Button
            label="Delete"
            aria-label={`Delete space ${s.name}`}
            tone="quiet"
            busy={remove.isPending}
            onPress={() => {
              setError(null);
              remove.mutate(s, { onError: (err) => setError(writeErrorMessage(err)) });
            }}
          />
        </View>
      ) : null}
    </View>
  );
}

const FIELDS = ['levelId', 'name', 'floorArea', 'ceilingHeight', 'occupancy', 'enclosed', 'linkedSpaceIds'] as const;

function SpaceForm({ job, levelId, existing, onDone }: { job: JobDetail; levelId: string; existing?: SpaceDto; onDone?: () => void }) {
  const wide = useWide();
  const create = useCreateSpaceMutation(job.id);
  const update = useUpdateSpaceMutation(job.id);
  const metric = job.unitSystem === 'metric';
  const siblings = useSpacesQuery(job.id, levelId);
  const others = (siblings.data ?? []).filter((x) => x.id !== existing?.id);
  const { control, handleSubmit, reset, setError } = useForm({
    resolver: zodResolver(createSpaceSchema),
    defaultValues: {
      levelId,
      name: existing?.name ?? '',
      floorArea: existing?.floorArea != null ? formatQuantity(existing.floorArea, 'area', job.unitSystem).replace(/,/g, '') : null,
      ceilingHeight: existing?.ceilingHeight != null ? formatQuantity(existing.ceilingHeight, 'length', job.unitSystem) : null,
      occupancy: existing?.occupancy ?? 'general',
      enclosed: existing?.enclosed ?? true,
      linkedSpaceIds: existing?.linkedSpaceIds ?? [],
    },
  });
  const submit = handleSubmit(async (values) => {
    try {
      if (existing) {
        await update.mutateAsync({ space: existing, input: values });
        onDone?.();
      } else {
        await create.mutateAsync(values);
        reset({ levelId, name: '', floorArea: null, ceilingHeight: null, occupancy: 'general', enclosed: true, linkedSpaceIds: [] });
      }
    } catch (err) {
      showServerErrors(err, setError, FIELDS);
    }
  });
  return (
    <Card testID={existing ? `space-form-${existing.name}` : 'space-add'}>
      <AppText variant="heading">{existing ? `Edit ${existing.name}` : 'Add a space'}</AppText>
      <FormBanner control={control} testID="space-form-error" />
      <FormText control={control} name="name" label="Space name" testID="space-name-input" placeholder="e.g. Office 301, Corridor" />
      <View style={wide ? styles.pair : null}>
        <View style={styles.cell}>
          <FormQuantity
            control={control}
            name="floorArea"
            label="Floor area"
            testID="space-area-input"
            units={['ft²', 'm²']}
            defaultUnit={metric ? 'm²' : 'ft²'}
          />
        </View>
        <View style={styles.cell}>
          <FormQuantity
            control={control}
            name="ceilingHeight"
            label="Ceiling height"
            testID="space-height-input"
            units={['ft', 'm']}
            defaultUnit={metric ? 'm' : 'ft'}
            hint={`A number with ft or m, or as written: 10' 6", 3.2 m.`}
          />
        </View>
      </View>
      <FormSelect
        control={control}
        name="occupancy"
        label="Occupancy"
        testID="space-occupancy-input"
        options={[
          { value: 'general', label: 'General' },
          { value: 'institutional', label: 'Institutional (halves the refrigerant limit)' },
        ]}
      />
      <Controller
        control={control}
        name="enclosed"
        render={({ field }) => (
          <Segmented
            label="For the refrigerant check"
            testID="space-enclosed-input"
            value={field.value === false ? 'open' : 'enclosed'}
            options={[
              { value: 'enclosed', label: 'Enclosed, occupied' },
              { value: 'open', label: 'Not enclosed (does not count)' },
            ]}
            onChange={(v) => field.onChange(v === 'enclosed')}
          />
        )}
      />
      {others.length > 0 ? (
        <Controller
          control={control}
          name="linkedSpaceIds"
          render={({ field, fieldState }) => (
            <Chips
              label="Joined by a permanent opening to (counts as one volume)"
              testID="space-links-input"
              values={field.value ?? []}
              options={others.map((o) => ({ value: o.id, label: o.name }))}
              onChange={field.onChange}
              error={fieldState.error?.message}
            />
          )}
        />
      ) : null}
      <View style={styles.actions}>
        <Button testID="space-submit" label={existing ? 'Save space' : 'Add space'} onPress={submit} busy={create.isPending || update.isPending} />
        {existing ? <Button label="Cancel" tone="quiet" onPress={onDone} /> : null}
      </View>
    </Card>
  );
}

const styles = StyleSheet.create({
  body: { gap: space.lg },
  list: { gap: space.sm },
  link: { paddingVertical: space.xs },
  pair: { flexDirection: 'row', gap: space.lg },
  cell: { flex: 1, minWidth: 0 },
  grow: { flexGrow: 1, flexShrink: 1, flexBasis: 240, minWidth: 0, gap: 2 },
  titleRow: { flexDirection: 'row', flexWrap: 'wrap', alignItems: 'center', gap: space.sm },
  row: {
    flexDirection: 'row',
    flexWrap: 'wrap',
    alignItems: 'center',
    gap: space.md,
    backgroundColor: colors.surface,
    borderRadius: radius.md,
    borderWidth: 1,
    borderColor: colors.line,
    padding: space.md,
  },
  actions: { flexDirection: 'row', flexWrap: 'wrap', gap: space.xs, alignItems: 'center' },
});
