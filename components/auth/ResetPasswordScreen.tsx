import { zodResolver } from '@hookform/resolvers/zod';
import { useRouter } from 'expo-router';
import { useForm } from 'react-hook-form';
import { passwordResetSchema, type PasswordResetInput } from '../../shared/schemas/auth';
import { ApiError } from '../api/client';
import { usePasswordResetPreviewQuery, useResetPasswordMutation } from '../queries/auth';
import { AppText } from '../ui/AppText';
import { Button } from '../ui/Button';
import { Notice } from '../ui/Notice';
import { LoadingState } from '../ui/States';
import { FormText } from '../ui/FormFields';
import { AuthFrame, AuthLink } from './AuthFrame';
import { applyApiError } from './formErrors';
import { links } from '../links';
import { FormBanner } from '../ui/FormBanner';

/** /reset/<token>: choose a new password; every other session ends and this one is signed in. */
export function ResetPasswordScreen({ token }: { token: string }) {
  const preview = usePasswordResetPreviewQuery(token);
  const reset = useResetPasswordMutation(token);
  const router = useRouter();
  const { control, handleSubmit, setError } = useForm<PasswordResetInput>({
    resolver: zodResolver(passwordResetSchema),
    defaultValues: { password: '' },
  });
  const onSubmit = handleSubmit(async (values) => {
    try {
      await reset.mutateAsync(values);
      router.replace(links.home());
    } catch (err) {
      applyApiError(err, setError, ['password'], 'That did not work. Try again.');
    }
  });
  const footer = <AuthLink href={links.signIn()} label="Back to sign in" testID="reset-to-sign-in" />;

  if (preview.isPending) {
    return (
      <AuthFrame testID="reset-screen" title="Choose a new password">
        <LoadingState label="Checking your link…" testID="reset-loading" />
      </AuthFrame>
    );
  }
  if (preview.isError) {
    const gone = preview.error instanceof ApiError && [400, 404, 410].includes(preview.error.status);
    return (
      <AuthFrame testID="reset-screen" title="This link cannot be used" footer={footer}>
        <Notice tone="error" testID="reset-error">
          {preview.error.message}
        </Notice>
        {gone ? (
          <AuthLink href={links.forgotPassword()} label="Ask for a new link" testID="reset-new-link" />
        ) : (
          <Button label="Try again" tone="secondary" onPress={() => preview.refetch()} testID="reset-retry" />
        )}
      </AuthFrame>
    );
  }
  return (
    <AuthFrame testID="reset-screen" title="Choose a new password" footer={footer}>
      <AppText muted>Setting a new password signs you out on every other device.</AppText>
      <FormBanner control={control} testID="reset-submit-error" />
      <FormText
        control={control}
        name="password"
        testID="reset-password"
        label="New password"
        hint="At least 8 characters; a long phrase is best."
        secureTextEntry
        autoComplete="new-password"
        returnKeyType="go"
        onSubmitEditing={onSubmit}
      />
      <Button testID="reset-submit" label="Save and sign in" onPress={onSubmit} busy={reset.isPending} />
    </AuthFrame>
  );
}
