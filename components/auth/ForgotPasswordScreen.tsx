import { zodResolver } from '@hookform/resolvers/zod';
import { useForm } from 'react-hook-form';
import { passwordResetRequestSchema, type PasswordResetRequestInput } from '../../shared/schemas/auth';
import { usePasswordResetRequestMutation } from '../queries/auth';
import { Button } from '../ui/Button';
import { Notice } from '../ui/Notice';
import { FormText } from '../ui/FormFields';
import { AuthFrame, AuthLink } from './AuthFrame';
import { applyApiError } from './formErrors';
import { links } from '../links';
import { FormBanner } from '../ui/FormBanner';

/** /forgot-password: ask for a reset link. The answer is the same whether the address has an account. */
export function ForgotPasswordScreen() {
  const requestReset = usePasswordResetRequestMutation();
  const { control, handleSubmit, setError } = useForm<PasswordResetRequestInput>({
    resolver: zodResolver(passwordResetRequestSchema),
    defaultValues: { email: '' },
  });
  const onSubmit = handleSubmit(async (values) => {
    try {
      await requestReset.mutateAsync(values);
    } catch (err) {
      applyApiError(err, setError, ['email'], 'That did not work. Try again.');
    }
  });
  const footer = <AuthLink href={links.signIn()} label="Back to sign in" testID="forgot-to-sign-in" />;
  if (requestReset.isSuccess) {
    return (
      <AuthFrame testID="forgot-screen" title="Check your e-mail" footer={footer}>
        <Notice tone="success" testID="forgot-done">
          {requestReset.data.message}
        </Notice>
      </AuthFrame>
    );
  }
  return (
    <AuthFrame
      testID="forgot-screen"
      title="Forgot your password?"
      intro="Enter the e-mail address of your account. We send it a link to choose a new password."
      footer={footer}
    >
      <FormBanner control={control} testID="forgot-error" />
      <FormText
        control={control}
        name="email"
        testID="forgot-email"
        label="E-mail"
        autoCapitalize="none"
        autoComplete="email"
        inputMode="email"
        returnKeyType="go"
        onSubmitEditing={onSubmit}
      />
      <Button testID="forgot-submit" label="Send me a link" onPress={onSubmit} busy={requestReset.isPending} />
    </AuthFrame>
  );
}
