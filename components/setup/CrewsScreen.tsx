import { zodResolver } from '@hookform/resolvers/zod';
import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { StyleSheet, View } from 'react-native';
import { createCrewSchema, updateCrewSchema, type CreateCrewInput, type CrewDto, type JobCompanyDto, type JobDetail } from '../../shared/schemas/setup';
import { useJobCompaniesQuery } from '../queries/companies';
import { useAddCrewMutation, useCrewsQuery, useRemoveCrewMutation, useRenameCrewMutation } from '../queries/crews';
import { space } from '../theme';
import { AppText } from '../ui/AppText';
import { Button } from '../ui/Button';
import { Card } from '../ui/Card';
import { FormBanner } from '../ui/FormBanner';
import { FormSelect, FormText } from '../ui/FormFields';
import { Notice } from '../ui/Notice';
import { EmptyState, ErrorState, LoadingState } from '../ui/States';
import { showServerErrors, writeErrorMessage } from './formErrors';
import { SetupFrame } from './SetupFrame';

/**
 * Crews: named teams within each company on the job. A unit records which crew installed it, so
 * the levels board can show a recurring defect by crew (a habit belongs to a crew). A GC manager
 * names the crews of every company; a subcontractor those of their own company (the server
 * lists only theirs); an inspector reads them.
 */
export function CrewsScreen({ jobId }: { jobId: string }) {
  return (
    <SetupFrame
      jobId={jobId}
      section="crews"
      title="Crews"
      intro="The teams within each company. Each unit records the crew that installed it, so a defect that keeps coming back can be traced to a crew's habit."
      testID="crews-screen"
      editor={(job) => job.role === 'gc_manager' || job.role === 'subcontractor'}
    >
      {(job) => <CrewsBody job={job} />}
    </SetupFrame>
  );
}

function CrewsBody({ job }: { job: JobDetail }) {
  const crews = useCrewsQuery(job.id);
  const companies = useJobCompaniesQuery(job.id);
  const [adding, setAdding] = useState(false);
  const canManage = job.role === 'gc_manager' || job.role === 'subcontractor';
  if (crews.isPending || companies.isPending) return <LoadingState label="Loading crews…" />;
  if (crews.isError) return <ErrorState message={crews.error.message} onRetry={() => crews.refetch()} />;
  if (companies.isError) return <ErrorState message={companies.error.message} onRetry={() => companies.refetch()} />;
  const scope = crews.data.companyScope;
  // The companies whose crews the caller names: all of the job's for a GC manager, their own for a subcontractor.
  const manageable = canManage ? companies.data.filter((c) => !scope || c.id === scope) : [];
  const shown = scope ? companies.data.filter((c) => c.id === scope) : companies.data;
  const groups = shown.map((c) => ({ company: c, crews: crews.data.items.filter((x) => x.companyId === c.id) })).filter((g) => g.crews.length > 0);
  return (
    <View style={styles.body}>
      {manageable.length > 0 ? (
        adding ? (
          <AddCrew job={job} companies={manageable} onDone={() => setAdding(false)} />
        ) : (
          <Button testID="crew-add" label="Name a crew" tone="secondary" onPress={() => setAdding(true)} style={styles.start} />
        )
      ) : null}
      {groups.length === 0 ? (
        <EmptyState
          title="No crews yet"
          body={canManage ? 'Name the crews that install the units, then give each unit its crew on the Units page or in the import.' : 'No company on this job has named its crews yet.'}
          testID="crews-empty"
        />
      ) : (
        <View style={styles.list} testID="crews-list">
          {groups.map((g) => (
            <Card key={g.company.id} testID={`crews-company-${g.company.name}`}>
              <AppText variant="heading" role="heading" aria-level={2}>
                {g.company.name}
              </AppText>
              {g.crews.map((crew) => (
                <CrewRow key={crew.id} job={job} crew={crew} editor={manageable.some((c) => c.id === crew.companyId)} />
              ))}
            </Card>
          ))}
        </View>
      )}
    </View>
  );
}

function CrewRow({ job, crew, editor }: { job: JobDetail; crew: CrewDto; editor: boolean }) {
  const [editing, setEditing] = useState(false);
  const [rowError, setRowError] = useState<string | null>(null);
  const rename = useRenameCrewMutation(job.id);
  const remove = useRemoveCrewMutation(job.id);
  const { control, handleSubmit, setError, reset } = useForm({ resolver: zodResolver(updateCrewSchema), defaultValues: { name: crew.name } });
  const save = handleSubmit(async (input) => {
    try {
      await rename.mutateAsync({ crew, input });
      setEditing(false);
    } catch (err) {
      showServerErrors(err, setError, ['name'], { duplicate: 'name' });
    }
  });
  return (
    <View style={styles.row} testID={`crew-${crew.name}`}>
      {editing ? (
        <View style={styles.grow}>
          <FormBanner control={control} testID={`crew-rename-error-${crew.name}`} />
          <FormText control={control} name="name" label="Crew name" testID={`crew-rename-input-${crew.name}`} />
          <View style={styles.actions}>
            <Button label="Save name" busy={rename.isPending} onPress={save} testID={`crew-rename-save-${crew.name}`} />
            <Button label="Cancel" tone="quiet" onPress={() => setEditing(false)} />
          </View>
        </View>
      ) : (
        <>
          <View style={styles.grow}>
            <AppText variant="label">{crew.name}</AppText>
            <AppText variant="small" muted testID={`crew-units-${crew.name}`}>
              {crew.unitCount === 0 ? 'No units recorded yet' : `Installed ${crew.unitCount} unit${crew.unitCount === 1 ? '' : 's'}`}
            </AppText>
          </View>
          {editor ? (
            <View style={styles.actions}>
              <Button
                label="Rename"
                aria-label={`Rename the crew ${crew.name}`}
                tone="quiet"
                testID={`crew-rename-${crew.name}`}
                onPress={() => {
                  setRowError(null);
                  reset({ name: crew.name });
                  setEditing(true);
                }}
              />
              <Button
                label="Remove"
                aria-label={`Remove the crew ${crew.name}`}
                tone="quiet"
                busy={remove.isPending}
                testID={`crew-remove-${crew.name}`}
                onPress={() => {
                  setRowError(null);
                  remove.mutate(crew, { onError: (err) => setRowError(writeErrorMessage(err)) });
                }}
              />
            </View>
          ) : null}
        </>
      )}
      {rowError ? (
        <View style={styles.full}>
          <Notice tone="error">{rowError}</Notice>
        </View>
      ) : null}
    </View>
  );
}

function AddCrew({ job, companies, onDone }: { job: JobDetail; companies: JobCompanyDto[]; onDone: () => void }) {
  const add = useAddCrewMutation(job.id);
  const only = companies.length === 1 ? companies[0]! : null;
  const { control, handleSubmit, setError } = useForm<CreateCrewInput>({
    resolver: zodResolver(createCrewSchema),
    defaultValues: { companyId: only?.id ?? '', name: '' },
  });
  const submit = handleSubmit(async (input) => {
    try {
      await add.mutateAsync(input);
      onDone();
    } catch (err) {
      showServerErrors(err, setError, ['companyId', 'name'], { duplicate: 'name' });
    }
  });
  return (
    <Card testID="crew-form">
      <AppText variant="heading">Name a crew</AppText>
      <FormBanner control={control} testID="crew-form-error" />
      {only ? (
        <AppText muted testID="crew-form-company">
          A crew of {only.name}
        </AppText>
      ) : (
        <FormSelect
          control={control}
          name="companyId"
          label="Company"
          testID="crew-company-input"
          placeholder="Choose the company"
          options={companies.map((c) => ({ value: c.id, label: c.name }))}
        />
      )}
      <FormText control={control} name="name" label="Crew name" hint="As the site knows it, e.g. Blue crew or Lopez crew." testID="crew-name-input" />
      <View style={styles.actions}>
        <Button testID="crew-submit" label="Add crew" onPress={submit} busy={add.isPending} />
        <Button label="Cancel" tone="quiet" onPress={onDone} />
      </View>
    </Card>
  );
}

const styles = StyleSheet.create({
  body: { gap: space.lg },
  start: { alignSelf: 'flex-start' },
  list: { gap: space.md },
  row: { flexDirection: 'row', flexWrap: 'wrap', alignItems: 'center', gap: space.sm, paddingVertical: space.xs },
  grow: { flexGrow: 1, flexShrink: 1, flexBasis: 200, minWidth: 0, gap: 2 },
  full: { flexBasis: '100%' },
  actions: { flexDirection: 'row', flexWrap: 'wrap', gap: space.xs, alignItems: 'center' },
});
