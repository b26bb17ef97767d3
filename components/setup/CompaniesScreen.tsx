import { zodResolver } from '@hookform/resolvers/zod';
import { useState } from 'react';
import { useForm, type Resolver } from 'react-hook-form';
import { StyleSheet, View } from 'react-native';
import { addJobCompanySchema, updateJobCompanySchema, type AddJobCompanyInput, type JobCompanyDto, type JobDetail } from '../../shared/schemas/setup';
import { TRADES, type TradeKey } from '../../shared/words';
import { useAddCompanyMutation, useJobCompaniesQuery, useKnownCompaniesQuery, useRemoveCompanyMutation, useUpdateCompanyMutation } from '../queries/companies';
import { space } from '../theme';
import { AppText } from '../ui/AppText';
import { Badge } from '../ui/Badge';
import { Button } from '../ui/Button';
import { Card } from '../ui/Card';
import { FormBanner } from '../ui/FormBanner';
import { FormChips, FormSelect, FormText } from '../ui/FormFields';
import { Notice } from '../ui/Notice';
import { EmptyState, ErrorState, LoadingState } from '../ui/States';
import { showServerErrors, writeErrorMessage } from './formErrors';
import { SetupFrame, canEditSetup } from './SetupFrame';

export const TRADE_LABEL: Record<TradeKey, string> = Object.fromEntries(TRADES.map((t) => [t.key, t.label])) as Record<TradeKey, string>;
const TRADE_OPTIONS = TRADES.map((t) => ({ value: t.key, label: t.label }));

export function CompaniesScreen({ jobId }: { jobId: string }) {
  return (
    <SetupFrame
      jobId={jobId}
      section="companies"
      title="Companies"
      intro="The companies on the job and the trades each covers. Findings go to the company whose trade does the fix."
      testID="companies-screen"
    >
      {(job) => <CompaniesBody job={job} />}
    </SetupFrame>
  );
}

function CompaniesBody({ job }: { job: JobDetail }) {
  const editor = canEditSetup(job);
  const companies = useJobCompaniesQuery(job.id);
  const [adding, setAdding] = useState(false);
  return (
    <View style={styles.body}>
      {editor ? (
        adding ? (
          <AddCompany job={job} onDone={() => setAdding(false)} existing={companies.data ?? []} />
        ) : (
          <Button testID="company-add" label="Add a company" tone="secondary" onPress={() => setAdding(true)} style={styles.start} />
        )
      ) : null}
      {companies.isPending ? (
        <LoadingState label="Loading companies…" />
      ) : companies.isError ? (
        <ErrorState message={companies.error.message} onRetry={() => companies.refetch()} />
      ) : companies.data.length === 0 ? (
        <EmptyState title="No companies yet" body="Add the subcontractors working on the job and the trades they cover." testID="companies-empty" />
      ) : (
        <View style={styles.list} testID="companies-list">
          {companies.data.map((c) => (
            <CompanyCard key={c.id} job={job} company={c} editor={editor} />
          ))}
        </View>
      )}
    </View>
  );
}

function CompanyCard({ job, company, editor }: { job: JobDetail; company: JobCompanyDto; editor: boolean }) {
  const [editing, setEditing] = useState(false);
  const [error, setRowError] = useState<string | null>(null);
  const update = useUpdateCompanyMutation(job.id);
  const remove = useRemoveCompanyMutation(job.id);
  const { control, handleSubmit, setError, reset, formState } = useForm({
    resolver: zodResolver(updateJobCompanySchema),
    defaultValues: { trades: company.trades },
  });
  const save = handleSubmit(async (input) => {
    setRowError(null);
    try {
      await update.mutateAsync({ company, input });
      setEditing(false);
    } catch (err) {
      showServerErrors(err, setError, ['trades']);
    }
  });
  const shown = error ?? (editing ? formState.errors.root?.message : undefined);
  return (
    <Card testID={`company-card-${company.name}`}>
      <View style={styles.head}>
        <View style={styles.grow}>
          <View style={styles.titleRow}>
            <AppText variant="heading">{company.name}</AppText>
            {company.isOwner ? <Badge label="Runs the job" tone="info" /> : null}
          </View>
          <AppText variant="small" muted>
            {company.memberCount} member{company.memberCount === 1 ? '' : 's'} on this job
          </AppText>
        </View>
        {editor && !editing ? (
          <View style={styles.actions}>
            <Button
              label="Edit trades"
              aria-label={`Edit trades — ${company.name}`}
              tone="quiet"
              testID={`company-edit-${company.name}`}
              onPress={() => {
                reset({ trades: company.trades });
                setEditing(true);
              }}
            />
            {!company.isOwner ? (
              <Button
                label="Remove"
                aria-label={`Remove ${company.name} from the job`}
                tone="quiet"
                busy={remove.isPending}
                onPress={() => {
                  setRowError(null);
                  remove.mutate(company, { onError: (err) => setRowError(writeErrorMessage(err)) });
                }}
              />
            ) : null}
          </View>
        ) : null}
      </View>
      {shown ? <Notice tone="error">{shown}</Notice> : null}
      {editing ? (
        <>
          <FormChips control={control} name="trades" label="Trades" options={TRADE_OPTIONS} testID={`company-trades-${company.name}`} />
          <View style={styles.actions}>
            <Button label="Save trades" busy={update.isPending} onPress={save} />
            <Button label="Cancel" tone="quiet" onPress={() => setEditing(false)} />
          </View>
        </>
      ) : (
        <View style={styles.badges}>
          {company.trades.length === 0 ? (
            <AppText variant="small" muted>
              No trades yet.
            </AppText>
          ) : (
            company.trades.map((t) => <Badge key={t} label={TRADE_LABEL[t]} />)
          )}
        </View>
      )}
    </Card>
  );
}

interface AddCompanyValues {
  /** A company the caller's company already works with; unset for a new one. */
  companyId?: string;
  name: string;
  trades: TradeKey[];
}

const [linkCompanySchema, newCompanySchema] = addJobCompanySchema.options;
const linkCompany = zodResolver(linkCompanySchema);
const newCompany = zodResolver(newCompanySchema);

/**
 * The request takes either a known company (companyId) or a new one (name): the form is checked
 * against the branch of the shared schema it stands for, so each message lands on its own field.
 */
const addCompanyResolver: Resolver<AddCompanyValues, unknown, AddJobCompanyInput> = async (values, context, options) => {
  if (values.companyId) return linkCompany({ companyId: values.companyId, trades: values.trades }, context, options as never);
  const result = await newCompany({ name: values.name, trades: values.trades }, context, options as never);
  if (values.name.trim() === '') {
    return { values: {}, errors: { ...result.errors, name: { type: 'required', message: 'Enter a company name, or choose one you already work with.' } } };
  }
  return result as Awaited<ReturnType<Resolver<AddCompanyValues, unknown, AddJobCompanyInput>>>;
};

function AddCompany({ job, onDone, existing }: { job: JobDetail; onDone: () => void; existing: JobCompanyDto[] }) {
  const add = useAddCompanyMutation(job.id);
  const known = useKnownCompaniesQuery(true);
  const { control, handleSubmit, setError, watch } = useForm<AddCompanyValues, unknown, AddJobCompanyInput>({
    resolver: addCompanyResolver,
    defaultValues: { companyId: undefined, name: '', trades: [] },
  });
  const companyId = watch('companyId');
  const onJob = new Set(existing.map((c) => c.id));
  const knownOptions = (known.data ?? []).filter((c) => !onJob.has(c.id)).map((c) => ({ value: c.id, label: c.name }));

  const submit = handleSubmit(async (input) => {
    try {
      await add.mutateAsync(input);
      onDone();
    } catch (err) {
      showServerErrors(err, setError, ['companyId', 'name', 'trades']);
    }
  });

  return (
    <Card testID="company-form">
      <AppText variant="heading">Add a company</AppText>
      <FormBanner control={control} testID="company-form-error" />
      {knownOptions.length > 0 ? (
        <FormSelect control={control} name="companyId" label="A company you already work with" testID="company-known-input" placeholder="— a new company —" options={knownOptions} />
      ) : null}
      {!companyId ? <FormText control={control} name="name" label="Company name" testID="company-name-input" /> : null}
      <FormChips control={control} name="trades" label="Trades it covers on this job" options={TRADE_OPTIONS} testID="company-trades-input" />
      <View style={styles.actions}>
        <Button testID="company-submit" label="Add company" onPress={submit} busy={add.isPending} />
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
  grow: { flexGrow: 1, flexShrink: 1, flexBasis: 240, minWidth: 0, gap: 2 },
  titleRow: { flexDirection: 'row', flexWrap: 'wrap', alignItems: 'center', gap: space.sm },
  actions: { flexDirection: 'row', flexWrap: 'wrap', gap: space.xs, alignItems: 'center' },
  badges: { flexDirection: 'row', flexWrap: 'wrap', gap: space.xs },
});
