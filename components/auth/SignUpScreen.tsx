import { zodResolver } from '@hookform/resolvers/zod';
import { useRef } from 'react';
import { useForm } from 'react-hook-form';
import type { TextInput } from 'react-native';
import { signUpSchema, type SignUpInput } from '../../shared/schemas/auth';
import { useSignUpMutation } from '../queries/auth';
import { AppText } from '../ui/AppText';
import { Button } from '../ui/Button';
import { Notice } from '../ui/Notice';
import { FormText } from '../ui/FormFields';
import { AuthFrame, AuthLink } from './AuthFrame';
import { applyApiError } from './formErrors';
import { links } from '../links';
import { FormBanner } from '../ui/FormBanner';

/** A GC new to Trimout: their company and first account; the address is confirmed by mail. */
export function SignUpScreen() {
  const signUp = useSignUpMutation();
  const nameRef = useRef<TextInput>(null);
  const emailRef = useRef<TextInput>(null);
  const passwordRef = useRef<TextInput>(null);
  const { control, handleSubmit, setError } = useForm<SignUpInput>({
    resolver: zodResolver(signUpSchema),
    defaultValues: { companyName: '', name: '', email: '', password: '' },
  });
  const onSubmit = handleSubmit(async (values) => {
    try {
      await signUp.mutateAsync(values);
    } catch (err) {
      applyApiError(err, setError, ['companyName', 'name', 'email', 'password'], 'Sign-up failed. Try again.');
    }
  });
  const footer = <AuthLink href={links.signIn()} label="Already have an account? Sign in" testID="sign-up-to-sign-in" />;

  if (signUp.isSuccess) {
    return (
      <AuthFrame testID="sign-up-screen" title="Check your e-mail" footer={footer}>
        <Notice tone="success" testID="sign-up-done">
          {`We sent a link to ${signUp.variables.email}. Open it to confirm your address and you are signed in. The link works for 24 hours.`}
        </Notice>
        <AppText muted>No mail after a few minutes? Look in the spam folder, or sign up again with the same address to get a new link.</AppText>
      </AuthFrame>
    );
  }
  return (
    <AuthFrame
      testID="sign-up-screen"
      title="Create your Trimout account"
      intro="For a GC new to Trimout: your company and your own account. Others join a job by invitation from its GC manager."
      footer={footer}
    >
      <FormBanner control={control} testID="sign-up-error" />
      <FormText
        control={control}
        name="companyName"
        testID="sign-up-company"
        label="Company"
        autoComplete="organization"
        returnKeyType="next"
        onSubmitEditing={() => nameRef.current?.focus()}
      />
      <FormText
        control={control}
        name="name"
        inputRef={nameRef}
        testID="sign-up-name"
        label="Your name"
        autoComplete="name"
        returnKeyType="next"
        onSubmitEditing={() => emailRef.current?.focus()}
      />
      <FormText
        control={control}
        name="email"
        inputRef={emailRef}
        testID="sign-up-email"
        label="Work e-mail"
        autoCapitalize="none"
        autoComplete="email"
        inputMode="email"
        returnKeyType="next"
        onSubmitEditing={() => passwordRef.current?.focus()}
      />
      <FormText
        control={control}
        name="password"
        inputRef={passwordRef}
        testID="sign-up-password"
        label="Password"
        hint="At least 8 characters; a long phrase is best."
        secureTextEntry
        autoComplete="new-password"
        returnKeyType="go"
        onSubmitEditing={onSubmit}
      />
      <Button testID="sign-up-submit" label="Create account" onPress={onSubmit} busy={signUp.isPending} />
    </AuthFrame>
  );
}
