import { StyleSheet, View } from 'react-native';
import { ApiError } from '../api/client';
import { useUnsubscribeMutation, useUnsubscribePreviewQuery } from '../queries/preferences';
import { space } from '../theme';
import { AppText } from '../ui/AppText';
import { Button } from '../ui/Button';
import { Notice } from '../ui/Notice';
import { LoadingState } from '../ui/States';
import { AuthFrame, AuthLink } from '../auth/AuthFrame';
import { links } from '../links';

/**
 * /unsubscribe/<token> (from a digest or an event mail): says what the link turns off, and turns
 * it off on "Confirm". No sign-in needed: the signed link is the permission. Opening the page
 * changes nothing (mail scanners open links too).
 */
export function UnsubscribeScreen({ token }: { token: string }) {
  const preview = useUnsubscribePreviewQuery(token);
  const confirm = useUnsubscribeMutation(token);
  const footer = <AuthLink href={links.preferences()} label="All mail preferences (sign in)" testID="unsubscribe-preferences" />;

  if (preview.isPending) {
    return (
      <AuthFrame testID="unsubscribe-screen" title="Stop these mails">
        <LoadingState label="Checking your link…" testID="unsubscribe-loading" />
      </AuthFrame>
    );
  }
  if (preview.isError) {
    const gone = preview.error instanceof ApiError && [400, 404, 410].includes(preview.error.status);
    return (
      <AuthFrame testID="unsubscribe-screen" title="This link cannot be used" footer={footer}>
        <Notice tone="error" testID="unsubscribe-error">
          {preview.error.message}
        </Notice>
        {gone ? null : <Button label="Try again" tone="secondary" onPress={() => preview.refetch()} testID="unsubscribe-retry" />}
      </AuthFrame>
    );
  }
  const p = preview.data;
  const done = confirm.isSuccess;
  return (
    <AuthFrame testID="unsubscribe-screen" title={done ? 'Done: no more of these mails' : 'Stop these mails?'} footer={footer}>
      <View style={styles.body}>
        <AppText variant="label">{p.description}</AppText>
        <AppText muted testID="unsubscribe-address">
          For {p.address}
        </AppText>
      </View>
      {done ? (
        <Notice tone="success" testID="unsubscribe-done">
          They are off. Sign in and open your mail preferences to turn them on again.
        </Notice>
      ) : p.alreadyOff ? (
        <Notice tone="info" testID="unsubscribe-already-off">
          These mails are already off.
        </Notice>
      ) : (
        <>
          {confirm.isError ? (
            <Notice tone="error" testID="unsubscribe-confirm-error">
              {confirm.error.message}
            </Notice>
          ) : null}
          <Button testID="unsubscribe-confirm" label="Confirm: stop these mails" onPress={() => confirm.mutate()} busy={confirm.isPending} />
        </>
      )}
    </AuthFrame>
  );
}

const styles = StyleSheet.create({ body: { gap: space.xs } });
