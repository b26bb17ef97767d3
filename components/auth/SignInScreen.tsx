import { zodResolver } from '@hookform/resolvers/zod';
import { Link } from 'expo-router';
import { useRef } from 'react';
import { useForm } from 'react-hook-form';
import { StyleSheet, View, type TextInput } from 'react-native';
import { signInSchema, type SignInInput } from '../../shared/schemas/session';
import { ApiError } from '../api/client';
import { useSignInMutation } from '../queries/session';
import { colors, fonts, space } from '../theme';
import { AppText } from '../ui/AppText';
import { Button } from '../ui/Button';
import { Card } from '../ui/Card';
import { Screen } from '../ui/Screen';
import { FormText } from '../ui/FormFields';
import { Wordmark } from '../ui/Wordmark';
import { links } from '../links';

export function SignInScreen() {
  const signIn = useSignInMutation();
  const passwordRef = useRef<TextInput>(null);
  const { control, handleSubmit, formState, setError } = useForm<SignInInput>({
    resolver: zodResolver(signInSchema),
    defaultValues: { email: '', password: '' },
  });

  const onSubmit = handleSubmit(async (values) => {
    try {
      await signIn.mutateAsync(values);
    } catch (err) {
      if (err instanceof ApiError) {
        for (const [field, message] of Object.entries(err.fields)) {
          if (field === 'email' || field === 'password') setError(field, { message });
        }
        setError('root', { message: err.message });
      } else {
        setError('root', { message: 'Sign-in failed. Try again.' });
      }
    }
  });

  const rootError = formState.errors.root?.message;

  return (
    <Screen testID="sign-in-screen" maxWidth={440} main>
      <View style={styles.brand}>
        <Wordmark />
        <AppText muted>Install audits and punch lists for indoor units, from first walk to last sign-off.</AppText>
      </View>
      <Card>
        <AppText variant="title" role="heading" aria-level={1}>
          Sign in
        </AppText>
        {rootError ? (
          <View style={styles.alert} role="alert" testID="sign-in-error">
            <AppText style={styles.alertText}>{rootError}</AppText>
          </View>
        ) : null}
        <FormText
          control={control}
          name="email"
          testID="sign-in-email"
          label="E-mail"
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
          testID="sign-in-password"
          label="Password"
          secureTextEntry
          autoComplete="current-password"
          returnKeyType="go"
          onSubmitEditing={onSubmit}
        />
        <Button testID="sign-in-submit" label="Sign in" onPress={onSubmit} busy={signIn.isPending} />
        <Link href={links.forgotPassword()} testID="sign-in-forgot" style={styles.link}>
          Forgot your password?
        </Link>
      </Card>
      <View style={styles.signUp}>
        <AppText muted>New to Trimout?</AppText>
        <Link href={links.signUp()} testID="sign-in-sign-up" style={styles.link}>
          Create an account
        </Link>
      </View>
      <AppText variant="small" muted style={styles.note}>
        Trimout records what people observed on site. It does not certify an installation: the manufacturer&apos;s
        installation manual, local codes and licensed practice govern.
      </AppText>
    </Screen>
  );
}

const styles = StyleSheet.create({
  brand: { gap: space.sm, marginTop: space.xl, marginBottom: space.sm },
  alert: { backgroundColor: colors.dangerSoft, borderRadius: 8, padding: space.md },
  alertText: { color: colors.danger },
  note: { textAlign: 'center' },
  link: { color: colors.spruce, textDecorationLine: 'underline', fontFamily: fonts.bold, fontSize: 15, alignSelf: 'center', paddingVertical: space.xs },
  signUp: { flexDirection: 'row', flexWrap: 'wrap', justifyContent: 'center', alignItems: 'center', gap: space.sm },
});
