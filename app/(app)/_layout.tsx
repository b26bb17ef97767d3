import { Redirect, Slot } from 'expo-router';
import { View } from 'react-native';
import { useSessionQuery } from '../../components/queries/session';
import { AppHeader } from '../../components/ui/AppHeader';
import { ErrorState, LoadingState } from '../../components/ui/States';
import { links } from '../../components/links';

/** Guard: signed-out users go to sign-in. */
export default function SignedInLayout() {
  const session = useSessionQuery();
  if (session.isPending) return <LoadingState />;
  if (session.isError) return <ErrorState message={session.error.message} onRetry={() => session.refetch()} />;
  if (!session.data.user) return <Redirect href={links.signIn()} />;
  return (
    <View style={{ flex: 1 }}>
      <AppHeader />
      <Slot />
    </View>
  );
}
