import { zodResolver } from '@hookform/resolvers/zod';
import { useRouter } from 'expo-router';
import { useRef } from 'react';
import { useForm } from 'react-hook-form';
import { StyleSheet, View, type TextInput } from 'react-native';
import { invitationNewAccountSchema, type InvitationNewAccountInput, type InvitationPreview } from '../../shared/schemas/auth';
import { signInSchema } from '../../shared/schemas/session';
import { ApiError } from '../api/client';
import { useAcceptInvitationMutation, useInvitationPreviewQuery } from '../queries/auth';
import { colors, space } from '../theme';
import { AppText } from '../ui/AppText';
import { Button } from '../ui/Button';
import { Notice } from '../ui/Notice';
import { RoleBadge } from '../ui/RoleBadge';
import { LoadingState } from '../ui/States';
import { FormText } from '../ui/FormFields';
import { TextField } from '../ui/TextField';
import { AuthFrame, AuthLink } from './AuthFrame';
import { applyApiError } from './formErrors';
import { links } from '../links';
import { FormBanner } from '../ui/FormBanner';

/** /invite/<token>: see the job and role, choose a password (or sign in), and land on the job. */
export function InvitationScreen({ token }: { token: string }) {
  const preview = useInvitationPreviewQuery(token);
  const footer = <AuthLink href={links.signIn()} label="Go to sign in" testID="invite-to-sign-in" />;

  if (preview.isPending) {
    return (
      <AuthFrame testID="invite-screen" title="Your invitation">
        <LoadingState label="Opening your invitation…" testID="invite-loading" />
      </AuthFrame>
    );
  }
  if (preview.isError) {
    const gone = preview.error instanceof ApiError && [400, 404, 410].includes(preview.error.status);
    return (
      <AuthFrame testID="invite-screen" title="This invitation cannot be used" footer={footer}>
        <Notice tone="error" testID="invite-error">
          {preview.error.message}
        </Notice>
        {gone ? (
          <AppText muted>
            {preview.error instanceof ApiError && preview.error.id === 'link_used'
              ? 'If you accepted it already, sign in: the job is on your job list.'
              : 'Ask the GC manager who invited you to send a new invitation.'}
          </AppText>
        ) : (
          <Button label="Try again" tone="secondary" onPress={() => preview.refetch()} testID="invite-retry" />
        )}
      </AuthFrame>
    );
  }
  const invite = preview.data;
  return (
    <AuthFrame testID="invite-screen" title={`Join ${invite.job.name}`} footer={footer}>
      <InvitationSummary invite={invite} />
      {invite.existingAccount ? <ExistingAccountForm token={token} invite={invite} /> : <NewAccountForm token={token} invite={invite} />}
    </AuthFrame>
  );
}

function InvitationSummary({ invite }: { invite: InvitationPreview }) {
  return (
    <View style={styles.summary} testID="invite-summary">
      <View style={styles.row}>
        <AppText variant="label">Your role</AppText>
        <RoleBadge role={invite.role} testID="invite-role" />
      </View>
      <AppText testID="invite-details">
        {`${invite.invitedBy ?? 'A GC manager'} invited you to work on this job for ${invite.company.name}.`}
      </AppText>
    </View>
  );
}

function useLandOnJob() {
  const router = useRouter();
  return (jobId: string) => router.replace(links.job(jobId));
}

function NewAccountForm({ token, invite }: { token: string; invite: InvitationPreview }) {
  const accept = useAcceptInvitationMutation(token);
  const land = useLandOnJob();
  const passwordRef = useRef<TextInput>(null);
  const { control, handleSubmit, setError } = useForm<InvitationNewAccountInput>({
    resolver: zodResolver(invitationNewAccountSchema),
    defaultValues: { name: invite.name ?? '', password: '' },
  });
  const onSubmit = handleSubmit(async (values) => {
    try {
      const session = await accept.mutateAsync(values);
      land(session.jobId);
    } catch (err) {
      applyApiError(err, setError, ['name', 'password'], 'That did not work. Try again.');
    }
  });
  return (
    <>
      <AppText muted>Choose your name as others will see it, and a password. You are signed in straight away.</AppText>
      <FormBanner control={control} testID="invite-accept-error" />
      <TextField
        testID="invite-email"
        label="E-mail (from the invitation)"
        value={invite.email}
        editable={false}
        autoComplete="username"
        style={styles.readOnly}
      />
      <FormText
        control={control}
        name="name"
        testID="invite-name"
        label="Your name"
        autoComplete="name"
        returnKeyType="next"
        onSubmitEditing={() => passwordRef.current?.focus()}
      />
      <FormText
        control={control}
        name="password"
        inputRef={passwordRef}
        testID="invite-password"
        label="Choose a password"
        hint="At least 8 characters; a long phrase is best."
        secureTextEntry
        autoComplete="new-password"
        returnKeyType="go"
        onSubmitEditing={onSubmit}
      />
      <Button testID="invite-submit" label="Join the job" onPress={onSubmit} busy={accept.isPending} />
    </>
  );
}

const existingSchema = signInSchema.pick({ password: true });
type ExistingInput = { password: string };

function ExistingAccountForm({ token, invite }: { token: string; invite: InvitationPreview }) {
  const accept = useAcceptInvitationMutation(token);
  const land = useLandOnJob();
  const { control, handleSubmit, setError } = useForm<ExistingInput>({
    resolver: zodResolver(existingSchema),
    defaultValues: { password: '' },
  });
  const onSubmit = handleSubmit(async (values) => {
    try {
      const session = await accept.mutateAsync(values);
      land(session.jobId);
    } catch (err) {
      applyApiError(err, setError, ['password'], 'That did not work. Try again.');
    }
  });
  return (
    <>
      <Notice tone="info" testID="invite-existing">
        {`${invite.email} already has a Trimout account. Sign in with its password to add this job to it.`}
      </Notice>
      <FormBanner control={control} testID="invite-accept-error" />
      <FormText
        control={control}
        name="password"
        testID="invite-password"
        label="Your password"
        secureTextEntry
        autoComplete="current-password"
        returnKeyType="go"
        onSubmitEditing={onSubmit}
      />
      <Button testID="invite-submit" label="Sign in and join" onPress={onSubmit} busy={accept.isPending} />
      <AuthLink href={links.forgotPassword()} label="Forgot your password?" testID="invite-forgot" />
    </>
  );
}

const styles = StyleSheet.create({
  summary: { gap: space.sm, marginBottom: space.sm },
  row: { flexDirection: 'row', alignItems: 'center', gap: space.sm },
  readOnly: { backgroundColor: colors.paper, color: colors.inkMuted, borderStyle: 'dashed' },
});
