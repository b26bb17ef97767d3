import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { addJobCompanySchema, type JobCompanyDto, type JobDetail } from '../../shared/schemas/setup';
import { TRADES, type TradeKey } from '../../shared/words';
import { ApiError } from '../api/client';
import { useAddCompanyMutation, useJobCompaniesQuery, useKnownCompaniesQuery, useRemoveCompanyMutation, useUpdateCompanyMutation } from '../queries/companies';
import { space } from '../theme';
import { AppText } from '../ui/AppText';
import { Badge } from '../ui/Badge';
import { Button } from '../ui/Button';
import { Card } from '../ui/Card';
import { Chips } from '../ui/Chips';
import { Notice } from '../ui/Notice';
import { Select } from '../ui/Select';
import { EmptyState, ErrorState, LoadingState } from '../ui/States';
import { TextField } from '../ui/TextField';
import { writeErrorMessage } from './formErrors';
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
  const [trades, setTrades] = useState<TradeKey[]>(company.trades);
  const [error, setError] = useState<string | null>(null);
  const update = useUpdateCompanyMutation(job.id);
  const remove = useRemoveCompanyMutation(job.id);
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
              tone="quiet"
              testID={`company-edit-${company.name}`}
              onPress={() => {
                setTrades(company.trades);
                setEditing(true);
              }}
            />
            {!company.isOwner ? (
              <Button
                label="Remove"
                tone="quiet"
                busy={remove.isPending}
                onPress={() => {
                  setError(null);
                  remove.mutate(company, { onError: (err) => setError(writeErrorMessage(err)) });
                }}
              />
            ) : null}
          </View>
        ) : null}
      </View>
      {error ? <Notice tone="error">{error}</Notice> : null}
      {editing ? (
        <>
          <Chips label="Trades" values={trades} options={TRADE_OPTIONS} onChange={setTrades} testID={`company-trades-${company.name}`} />
          <View style={styles.actions}>
            <Button
              label="Save trades"
              busy={update.isPending}
              onPress={() => {
                setError(null);
                update.mutate({ company, input: { trades } }, { onSuccess: () => setEditing(false), onError: (err) => setError(writeErrorMessage(err)) });
              }}
            />
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

function AddCompany({ job, onDone, existing }: { job: JobDetail; onDone: () => void; existing: JobCompanyDto[] }) {
  const add = useAddCompanyMutation(job.id);
  const known = useKnownCompaniesQuery(true);
  const [companyId, setCompanyId] = useState('');
  const [name, setName] = useState('');
  const [trades, setTrades] = useState<TradeKey[]>([]);
  const [errors, setErrors] = useState<Record<string, string>>({});
  const onJob = new Set(existing.map((c) => c.id));
  const knownOptions = (known.data ?? []).filter((c) => !onJob.has(c.id)).map((c) => ({ value: c.id, label: c.name }));

  const submit = () => {
    const input = companyId ? { companyId, trades } : { name, trades };
    const parsed = addJobCompanySchema.safeParse(input);
    if (!parsed.success) {
      const next: Record<string, string> = {};
      for (const issue of parsed.error.issues) next[String(issue.path[0] ?? 'root')] ??= issue.message;
      if (!companyId && name.trim() === '') next.name = 'Enter a company name, or choose one you already work with.';
      setErrors(next);
      return;
    }
    setErrors({});
    add.mutate(parsed.data, {
      onSuccess: onDone,
      onError: (err) => setErrors({ ...(err instanceof ApiError ? err.fields : {}), root: writeErrorMessage(err) }),
    });
  };

  return (
    <Card testID="company-form">
      <AppText variant="heading">Add a company</AppText>
      {errors.root ? (
        <Notice tone="error" testID="company-form-error">
          {errors.root}
        </Notice>
      ) : null}
      {knownOptions.length > 0 ? (
        <Select
          label="A company you already work with"
          testID="company-known-input"
          value={companyId}
          placeholder="— a new company —"
          options={knownOptions}
          onChange={setCompanyId}
        />
      ) : null}
      {!companyId ? <TextField label="Company name" testID="company-name-input" value={name} onChangeText={setName} error={errors.name} /> : null}
      <Chips label="Trades it covers on this job" values={trades} options={TRADE_OPTIONS} onChange={setTrades} error={errors.trades} testID="company-trades-input" />
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
