import { zodResolver } from '@hookform/resolvers/zod';
import { LevelPlanLink } from '../plans/PlanPinLink';
import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { StyleSheet, View } from 'react-native';
import { createLevelSchema, updateLevelSchema, type LevelDto } from '../../shared/schemas/setup';
import {
  useCreateLevelMutation,
  useCreateLevelsMutation,
  useDeleteLevelMutation,
  useLevelsQuery,
  useRenameLevelMutation,
  useReorderLevelsMutation,
} from '../queries/levels';
import { colors, radius, space } from '../theme';
import { AppText } from '../ui/AppText';
import { Button } from '../ui/Button';
import { Card } from '../ui/Card';
import { Notice } from '../ui/Notice';
import { EmptyState, ErrorState, LoadingState } from '../ui/States';
import { useWide } from '../ui/useWide';
import { FormText } from '../ui/FormFields';
import { writeErrorMessage } from '../api/writeErrors';
import { showServerErrors } from './formErrors';
import { SetupFrame, canEditSetup } from './SetupFrame';
import { FormBanner } from '../ui/FormBanner';
import { PasteNames } from './PasteNames';

export function LevelsScreen({ jobId }: { jobId: string }) {
  return (
    <SetupFrame jobId={jobId} section="levels" title="Levels" intro="The floors of the job, bottom to top, in the order inspectors walk them." testID="levels-screen">
      {(job) => <LevelsBody jobId={jobId} editor={canEditSetup(job)} />}
    </SetupFrame>
  );
}

function LevelsBody({ jobId, editor }: { jobId: string; editor: boolean }) {
  const levels = useLevelsQuery(jobId);
  const reorder = useReorderLevelsMutation(jobId);
  const [message, setMessage] = useState<string | null>(null);

  const move = (index: number, by: -1 | 1) => {
    if (!levels.data) return;
    const ids = levels.data.map((l) => l.id);
    const [moved] = ids.splice(index, 1);
    ids.splice(index + by, 0, moved!);
    setMessage(null);
    reorder.mutate(ids, { onError: (err) => setMessage(writeErrorMessage(err)) });
  };

  return (
    <View style={styles.body}>
      {editor ? <AddLevel jobId={jobId} /> : null}
      {editor ? <PasteLevels jobId={jobId} /> : null}
      {message ? (
        <Notice tone="error" testID="levels-error">
          {message}
        </Notice>
      ) : null}
      {levels.isPending ? (
        <LoadingState label="Loading levels…" />
      ) : levels.isError ? (
        <ErrorState message={levels.error.message} onRetry={() => levels.refetch()} />
      ) : levels.data.length === 0 ? (
        <EmptyState
          title="No levels yet"
          body={editor ? 'Add the first level above (for example "Level 1"), then the rest in order.' : 'The GC manager has not added levels yet.'}
          testID="levels-empty"
        />
      ) : (
        <View style={styles.list} testID="levels-list">
          {levels.data.map((level, i) => (
            <LevelRow
              key={level.id}
              jobId={jobId}
              level={level}
              editor={editor}
              first={i === 0}
              last={i === levels.data.length - 1}
              busy={reorder.isPending}
              onMove={(by) => move(i, by)}
            />
          ))}
        </View>
      )}
    </View>
  );
}

function PasteLevels({ jobId }: { jobId: string }) {
  const create = useCreateLevelsMutation(jobId);
  return (
    <PasteNames
      title="Add several levels"
      subject="a level name"
      max={80}
      noun={['level', 'levels']}
      placeholder={'Level 1\nLevel 2\nRoof'}
      testID="levels-paste"
      send={(names) => create.mutateAsync(names)}
    />
  );
}

function AddLevel({ jobId }: { jobId: string }) {
  const wide = useWide();
  const create = useCreateLevelMutation(jobId);
  const { control, handleSubmit, reset, setError } = useForm({
    resolver: zodResolver(createLevelSchema),
    defaultValues: { name: '' },
  });
  const submit = handleSubmit(async (values) => {
    try {
      await create.mutateAsync(values);
      reset({ name: '' });
    } catch (err) {
      showServerErrors(err, setError, ['name'], { duplicate: 'name' });
    }
  });
  return (
    <Card testID="level-add">
      <AppText variant="heading">Add a level</AppText>
      <FormBanner control={control} testID="level-form-error" />
      <View style={styles.addRow}>
        <View style={styles.grow}>
          <FormText
            control={control}
            name="name"
            label="Level name"
            testID="level-name-input"
            placeholder="e.g. Level 2, Roof, Basement"
            onSubmitEditing={submit}
            returnKeyType="done"
          />
        </View>
        <Button testID="level-add-submit" label="Add level" onPress={submit} busy={create.isPending} style={wide ? styles.addButton : styles.addButtonPhone} />
      </View>
    </Card>
  );
}

function LevelRow({
  jobId,
  level,
  editor,
  first,
  last,
  busy,
  onMove,
}: {
  jobId: string;
  level: LevelDto;
  editor: boolean;
  first: boolean;
  last: boolean;
  busy: boolean;
  onMove: (by: -1 | 1) => void;
}) {
  const [editing, setEditing] = useState(false);
  const rename = useRenameLevelMutation(jobId);
  const remove = useDeleteLevelMutation(jobId);
  const [rowError, setRowError] = useState<string | null>(null);
  const { control, handleSubmit, setError, reset } = useForm({
    resolver: zodResolver(updateLevelSchema),
    defaultValues: { name: level.name },
  });
  const save = handleSubmit(async (values) => {
    try {
      await rename.mutateAsync({ level, input: values });
      setEditing(false);
    } catch (err) {
      showServerErrors(err, setError, ['name'], { duplicate: 'name' });
    }
  });
  const counts = `${level.spaceCount} space${level.spaceCount === 1 ? '' : 's'} · ${level.unitCount} unit${level.unitCount === 1 ? '' : 's'}`;

  return (
    <View style={styles.row} testID={`level-row-${level.position}`}>
      <View style={styles.position}>
        <AppText variant="label" style={{ color: colors.paper }}>
          {level.position}
        </AppText>
      </View>
      {editing ? (
        <View style={styles.grow}>
          <FormBanner control={control} testID={`level-rename-error-${level.position}`} />
          <FormText control={control} name="name" label="New name" testID={`level-rename-input-${level.position}`} onSubmitEditing={save} autoFocus />
          <View style={styles.actions}>
            <Button testID={`level-rename-save-${level.position}`} label="Save" onPress={save} busy={rename.isPending} />
            <Button
              label="Cancel"
              tone="quiet"
              onPress={() => {
                reset({ name: level.name });
                setEditing(false);
              }}
            />
          </View>
        </View>
      ) : (
        <View style={styles.grow}>
          <AppText variant="heading" testID={`level-name-${level.position}`}>
            {level.name}
          </AppText>
          <AppText variant="small" muted>
            {counts}
            {level.plan ? ' · plan uploaded' : ''}
          </AppText>
          <LevelPlanLink jobId={jobId} levelId={level.id} levelName={level.name} testID={`level-plan-${level.position}`} />
          {rowError ? (
            <AppText variant="small" style={{ color: colors.danger }} role="alert">
              {rowError}
            </AppText>
          ) : null}
        </View>
      )}
      {editor && !editing ? (
        <View style={styles.actions}>
          <Button
            label="Up"
            tone="secondary"
            accessibilityLabel={`Up — move ${level.name} up`}
            testID={`level-up-${level.position}`}
            disabled={first || busy}
            onPress={() => onMove(-1)}
          />
          <Button
            label="Down"
            tone="secondary"
            accessibilityLabel={`Down — move ${level.name} down`}
            testID={`level-down-${level.position}`}
            disabled={last || busy}
            onPress={() => onMove(1)}
          />
          <Button label="Rename" tone="quiet" aria-label={`Rename ${level.name}`} testID={`level-rename-${level.position}`} onPress={() => setEditing(true)} />
          <Button
            label="Delete"
            aria-label={`Delete ${level.name}`}
            tone="quiet"
            testID={`level-delete-${level.position}`}
            busy={remove.isPending}
            onPress={() => {
              setRowError(null);
              remove.mutate(level, { onError: (err) => setRowError(writeErrorMessage(err)) });
            }}
          />
        </View>
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({
  body: { gap: space.lg },
  list: { gap: space.sm },
  addRow: { flexDirection: 'row', flexWrap: 'wrap', alignItems: 'flex-start', gap: space.md },
  // beside the field: level with the input under its label; below it on a phone
  addButton: { marginTop: 23 },
  addButtonPhone: { marginTop: -space.sm, alignSelf: 'flex-start' },
  grow: { flexGrow: 1, flexShrink: 1, flexBasis: 220, minWidth: 0 },
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
  position: {
    width: 36,
    height: 36,
    borderRadius: 18,
    backgroundColor: colors.spruce,
    alignItems: 'center',
    justifyContent: 'center',
  },
  actions: { flexDirection: 'row', flexWrap: 'wrap', gap: space.xs, alignItems: 'center' },
});
