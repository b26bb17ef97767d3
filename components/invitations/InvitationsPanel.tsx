import { zodResolver } from '@hookform/resolvers/zod';
import { useState } from 'react';
import { Controller, useForm } from 'react-hook-form';
import { StyleSheet, View } from 'react-native';
import { invitationFormSchema, type Invitation, type InvitationBulkInput, type InvitationFormInput } from '../../shared/schemas/auth';
import { ROLES, ROLE_LABELS } from '../../shared/words';
import { ApiError } from '../api/client';
import { useJobCompaniesQuery } from '../queries/companies';
import {
  inviteSeveralWrite,
  inviteWrite,
  useCreateInvitationMutation,
  useInvitationsQuery,
  useInviteSeveralMutation,
  useResendInvitationMutation,
  useRevokeInvitationMutation,
} from '../queries/invitations';
import { writeErrorMessage } from '../api/writeErrors';
import { PastePeople } from './PastePeople';
import { colors, radius, space } from '../theme';
import { AppText } from '../ui/AppText';
import { Button } from '../ui/Button';
import { Card } from '../ui/Card';
import { Notice } from '../ui/Notice';
import { RoleBadge } from '../ui/RoleBadge';
import { Segmented } from '../ui/Segmented';
import { Select } from '../ui/Select';
import { EmptyState, ErrorState, LoadingState } from '../ui/States';
import { TextField } from '../ui/TextField';
import { FormBanner, useFieldLabel } from '../ui/FormBanner';

/**
 * For GC managers on the members screen: invite someone by e-mail with a role and company, or
 * several people pasted at once, and see, send again or withdraw the invitations still waiting.
 * Drop it in with `<InvitationsPanel jobId={...} />`.
 */
export function InvitationsPanel({ jobId }: { jobId: string }) {
  return (
    <View style={styles.panel} testID="invitations-panel">
      <InviteForm jobId={jobId} />
      <PasteInvitations jobId={jobId} />
      <PendingInvitations jobId={jobId} />
    </View>
  );
}

const EMPTY: InvitationFormInput = { email: '', name: '', role: 'subcontractor', companyId: '' };

function InviteForm({ jobId }: { jobId: string }) {
  const companies = useJobCompaniesQuery(jobId);
  const create = useCreateInvitationMutation(jobId);
  const [sentTo, setSentTo] = useState<string | null>(null);
  // One write per user action: a retry of the same submit reuses its Idempotency-Key.
  const [pending, setPending] = useState<{ key: string; write: ReturnType<typeof inviteWrite> } | null>(null);
  const { control, handleSubmit, setError, reset, watch } = useForm<InvitationFormInput>({
    resolver: zodResolver(invitationFormSchema),
    defaultValues: EMPTY,
  });
  const role = watch('role');

  const onSubmit = handleSubmit(async (values) => {
    const input = {
      email: values.email,
      role: values.role,
      ...(values.name ? { name: values.name } : {}),
      ...(values.companyId ? { companyId: values.companyId } : {}),
    };
    const key = JSON.stringify(input);
    const write = pending?.key === key ? pending.write : inviteWrite(jobId, input);
    setPending({ key, write });
    try {
      await create.mutateAsync(write);
      setPending(null);
      setSentTo(values.email);
      reset({ ...EMPTY, role: values.role, companyId: values.companyId });
    } catch (err) {
      if (err instanceof ApiError) {
        for (const [field, message] of Object.entries(err.fields)) {
          if (field === 'email' || field === 'name' || field === 'role' || field === 'companyId') setError(field, { message });
        }
        if (err.status !== 0) setPending(null); // refused: a changed form makes a new write
        setError('root', { message: err.message });
      } else {
        setError('root', { message: 'The invitation was not sent. Try again.' });
      }
    }
  });

  const companyOptions = (companies.data ?? []).map((c) => ({ value: c.id, label: c.name }));
  // These fields are drawn here (the e-mail clears the sent note, the company list may be loading), so they tell the banner their labels themselves.
  useFieldLabel(control, 'email', 'E-mail');
  useFieldLabel(control, 'name', 'Name');
  useFieldLabel(control, 'role', 'Role');
  useFieldLabel(control, 'companyId', 'Company');
  return (
    <Card testID="invite-form">
      <AppText variant="heading" role="heading" aria-level={2}>
        Invite someone
      </AppText>
      <AppText variant="small" muted>
        They get an e-mail with a link that works once, for 7 days, to choose a password (or sign in, if they already have an
        account) and join this job.
      </AppText>
      {sentTo ? (
        <Notice tone="success" testID="invite-sent">
          {`Invitation sent to ${sentTo}.`}
        </Notice>
      ) : null}
      <FormBanner control={control} testID="invite-form-error" />
      <View style={styles.fields}>
        <View style={styles.field}>
          <Controller
            control={control}
            name="email"
            render={({ field, fieldState }) => (
              <TextField
                testID="invite-form-email"
                label="E-mail"
                value={field.value}
                onChangeText={(v) => {
                  setSentTo(null);
                  field.onChange(v);
                }}
                onBlur={field.onBlur}
                error={fieldState.error?.message}
                autoCapitalize="none"
                autoComplete="email"
                inputMode="email"
              />
            )}
          />
        </View>
        <View style={styles.field}>
          <Controller
            control={control}
            name="name"
            render={({ field, fieldState }) => (
              <TextField
                testID="invite-form-name"
                label="Name (optional)"
                value={field.value}
                onChangeText={field.onChange}
                onBlur={field.onBlur}
                error={fieldState.error?.message}
              />
            )}
          />
        </View>
      </View>
      <Controller
        control={control}
        name="role"
        render={({ field }) => (
          <Segmented
            label="Role"
            testID="invite-form-role"
            value={field.value}
            options={ROLES.map((r) => ({ value: r, label: ROLE_LABELS[r] }))}
            onChange={field.onChange}
          />
        )}
      />
      <Controller
        control={control}
        name="companyId"
        render={({ field, fieldState }) => (
          <Select
            testID="invite-form-company"
            label="Company"
            value={field.value}
            options={companyOptions}
            onChange={field.onChange}
            placeholder={role === 'subcontractor' ? 'Choose the company they work for' : 'My own company'}
            hint={companies.isError ? 'The companies on this job did not load.' : 'Companies on this job. Add a company on the Companies page first.'}
            error={fieldState.error?.message}
            disabled={companies.isPending}
          />
        )}
      />
      <Button testID="invite-form-submit" label="Send invitation" onPress={onSubmit} busy={create.isPending} />
    </Card>
  );
}

function PasteInvitations({ jobId }: { jobId: string }) {
  const companies = useJobCompaniesQuery(jobId);
  const inviteSeveral = useInviteSeveralMutation(jobId);
  // One write per press, as the invite form: the same list sent again after a lost answer reuses its key.
  const [pending, setPending] = useState<{ key: string; write: ReturnType<typeof inviteSeveralWrite> } | null>(null);
  const send = async (people: InvitationBulkInput['people']) => {
    const key = JSON.stringify(people);
    const write = pending?.key === key ? pending.write : inviteSeveralWrite(jobId, people);
    setPending({ key, write });
    try {
      await inviteSeveral.mutateAsync(write);
      setPending(null);
    } catch (err) {
      if (err instanceof ApiError && err.status !== 0) setPending(null); // refused: a changed list makes a new write
      throw err;
    }
  };
  return <PastePeople companies={companies.data} companiesError={companies.isError} send={send} />;
}

type Said = { tone: 'success' | 'error'; text: string };

function PendingInvitations({ jobId }: { jobId: string }) {
  const invitations = useInvitationsQuery(jobId);
  // Said above the list, not in a row: a resent invitation comes back as a new row (a new link).
  const [said, setSaid] = useState<Said | null>(null);
  return (
    <View style={styles.pending}>
      <AppText variant="heading" role="heading" aria-level={2}>
        Waiting for an answer
      </AppText>
      {said ? (
        <Notice tone={said.tone} testID="invitation-resend-result">
          {said.text}
        </Notice>
      ) : null}
      {invitations.isPending ? (
        <LoadingState label="Loading invitations…" testID="invitations-loading" />
      ) : invitations.isError ? (
        <ErrorState message={invitations.error.message} onRetry={() => invitations.refetch()} testID="invitations-error" />
      ) : invitations.data.length === 0 ? (
        <EmptyState title="No invitations waiting" body="Invitations appear here until they are accepted, withdrawn or expire." testID="invitations-empty" />
      ) : (
        <View style={styles.list} testID="invitations-list">
          {invitations.data.map((inv) => (
            <InvitationRow key={inv.id} jobId={jobId} invitation={inv} onSaid={setSaid} />
          ))}
        </View>
      )}
    </View>
  );
}

function InvitationRow({ jobId, invitation, onSaid }: { jobId: string; invitation: Invitation; onSaid: (said: Said | null) => void }) {
  const revoke = useRevokeInvitationMutation(jobId);
  const resend = useResendInvitationMutation(jobId);
  const expires = new Date(invitation.expiresAt);
  return (
    <View style={styles.row} testID={`invitation-row-${invitation.id}`}>
      <View style={styles.grow}>
        <AppText variant="heading">{invitation.name ?? invitation.email}</AppText>
        <AppText variant="small" muted>
          {[invitation.name ? invitation.email : null, invitation.company.name, `link valid until ${expires.toLocaleDateString()}`].filter(Boolean).join(' · ')}
        </AppText>
        <View style={styles.badge}>
          <RoleBadge role={invitation.role} />
        </View>
        {revoke.isError ? (
          <AppText variant="small" style={{ color: colors.danger }} role="alert">
            {revoke.error.message}
          </AppText>
        ) : null}
      </View>
      <View style={styles.actions}>
        <Button
          testID={`invitation-resend-${invitation.id}`}
          label="Send again"
          aria-label={`Send the invitation to ${invitation.email} again`}
          tone="quiet"
          busy={resend.isPending}
          disabled={revoke.isPending}
          onPress={async () => {
            onSaid(null);
            // The promise, not mutate's callbacks: the list is read again first and this row (the old link) is gone by then.
            try {
              const fresh = await resend.mutateAsync(invitation.id);
              onSaid({ tone: 'success', text: `A new link went to ${fresh.email}; the old link no longer works.` });
            } catch (err) {
              // 404 (gone) and 409 (accepted, withdrawn or expired meanwhile): the server's words, then the list as it is now.
              onSaid({ tone: 'error', text: writeErrorMessage(err, { afterConflict: 'The list shows the invitations still waiting.' }) });
            }
          }}
        />
        <Button
          testID={`invitation-withdraw-${invitation.id}`}
          label="Withdraw"
          tone="quiet"
          busy={revoke.isPending}
          disabled={resend.isPending}
          onPress={() => {
            onSaid(null);
            revoke.mutate(invitation.id);
          }}
        />
      </View>
    </View>
  );
}

const styles = StyleSheet.create({
  panel: { gap: space.lg },
  fields: { flexDirection: 'row', flexWrap: 'wrap', columnGap: space.md },
  field: { flexGrow: 1, flexBasis: 260 },
  pending: { gap: space.sm },
  list: { gap: space.sm },
  row: {
    flexDirection: 'row',
    flexWrap: 'wrap',
    alignItems: 'center',
    gap: space.sm,
    backgroundColor: colors.surface,
    borderWidth: 1,
    borderColor: colors.line,
    borderRadius: radius.md,
    padding: space.md,
  },
  grow: { flexGrow: 1, flexShrink: 1, flexBasis: 220, minWidth: 0, gap: 2 },
  badge: { flexDirection: 'row', marginTop: space.xs },
  actions: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm },
});
