import { Redirect, Slot } from 'expo-router';
import { View } from 'react-native';
import { OutboxProvider } from '../../components/outbox/OutboxProvider';
import { useSessionQuery } from '../../components/queries/session';
import { AppHeader } from '../../components/ui/AppHeader';
import { ErrorState, LoadingState } from '../../components/ui/States';
import { links } from '../../components/links';

/** Guard: signed-out users go to sign-in. */
export default function SignedInLayout() {
  const session = useSessionQuery();
  if (session.isPending) return <LoadingState />;
  // Offline with a level kept on the phone, the session kept with it stands until the network answers.
  if (session.isError && !session.data) return <ErrorState message={session.error.message} onRetry={() => session.refetch()} />;
  if (!session.data.user) return <Redirect href={links.signIn()} />;
  // The signed-in person's outbox runs while they are signed in (sent on start, 'online', every minute).
  return (
    <OutboxProvider userId={session.data.user.id}>
      <View style={{ flex: 1 }}>
        <AppHeader />
        <Slot />
      </View>
    </OutboxProvider>
  );
}
