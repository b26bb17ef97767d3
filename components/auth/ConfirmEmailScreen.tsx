import { useRouter } from 'expo-router';
import { useEffect, useRef } from 'react';
import { ApiError } from '../api/client';
import { useConfirmEmailMutation } from '../queries/auth';
import { Button } from '../ui/Button';
import { Notice } from '../ui/Notice';
import { LoadingState } from '../ui/States';
import { AuthFrame, AuthLink } from './AuthFrame';
import { links } from '../links';

/** /confirm/<token>: confirms the address once, then the person is signed in on their job list. */
export function ConfirmEmailScreen({ token }: { token: string }) {
  const confirm = useConfirmEmailMutation();
  const router = useRouter();
  const started = useRef(false);

  useEffect(() => {
    if (started.current || !token) return;
    started.current = true;
    confirm.mutate(token, { onSuccess: () => router.replace(links.home()) });
  }, [token, confirm, router]);

  if (confirm.isError) {
    const gone = confirm.error instanceof ApiError && (confirm.error.status === 410 || confirm.error.status === 404);
    return (
      <AuthFrame
        testID="confirm-screen"
        title="We could not confirm your e-mail"
        footer={<AuthLink href={links.signIn()} label="Go to sign in" testID="confirm-to-sign-in" />}
      >
        <Notice tone="error" testID="confirm-error">
          {confirm.error.message}
        </Notice>
        {gone ? (
          <Notice tone="info">
            If you already confirmed, just sign in. Otherwise sign up again with the same address, or use &quot;Forgot your
            password?&quot; on the sign-in page: both send a new link.
          </Notice>
        ) : (
          <Button testID="confirm-retry" label="Try again" tone="secondary" onPress={() => confirm.mutate(token, { onSuccess: () => router.replace(links.home()) })} />
        )}
      </AuthFrame>
    );
  }
  return (
    <AuthFrame testID="confirm-screen" title="Confirming your e-mail">
      <LoadingState label="Confirming your e-mail address…" testID="confirm-loading" />
    </AuthFrame>
  );
}
