import { Redirect, Slot } from 'expo-router';
import { useCallback, useEffect, type ReactNode } from 'react';
import { View } from 'react-native';
import { ApiError } from '../../components/api/client';
import { OfflineStart, rememberSignedIn } from '../../components/outbox/OfflineStart';
import { OutboxProvider } from '../../components/outbox/OutboxProvider';
import { useSessionQuery } from '../../components/queries/session';
import { AppHeader } from '../../components/ui/AppHeader';
import { ErrorState, LoadingState } from '../../components/ui/States';
import { links } from '../../components/links';

/** Guard: signed-out users go to sign-in. */
export default function SignedInLayout() {
  const session = useSessionQuery();
  const { refetch } = session;
  const retry = useCallback(() => void refetch(), [refetch]);
  const userId = session.data?.user?.id;
  useEffect(() => {
    if (userId) rememberSignedIn(userId);
  }, [userId]);
  if (session.isPending) return <Main><LoadingState /></Main>;
  // Offline with a level kept on the phone, the session kept with it stands until the network answers.
  if (session.isError && !session.data) {
    // No signal and no session kept on the phone: say so, and open by itself when the signal is back.
    if (session.error instanceof ApiError && session.error.id === 'offline') return <Main><OfflineStart message={session.error.message} onRetry={retry} /></Main>;
    return <Main><ErrorState message={session.error.message} onRetry={retry} /></Main>;
  }
  if (!session.data.user) return <Redirect href={links.signIn()} />;
  // The signed-in person's outbox runs while they are signed in (sent on start, 'online', every minute).
  return (
    <OutboxProvider userId={session.data.user.id}>
      <View style={{ flex: 1 }}>
        <AppHeader />
        <Main>
          <Slot />
        </Main>
      </View>
    </OutboxProvider>
  );
}

/** The screen's one main landmark; the header (a banner) stays outside it. */
function Main({ children }: { children: ReactNode }) {
  return (
    <View role="main" style={{ flex: 1 }}>
      {children}
    </View>
  );
}
