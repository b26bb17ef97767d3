import { useLocalSearchParams } from 'expo-router';
import { InvitationScreen } from '../../../components/auth/InvitationScreen';
import { useSessionQuery } from '../../../components/queries/session';
import { ErrorState, LoadingState } from '../../../components/ui/States';

export default function InvitationRoute() {
  const { token } = useLocalSearchParams<{ token: string }>();
  // The session query also fetches the CSRF token the write needs; a signed-in user may use the link too.
  const session = useSessionQuery();
  if (session.isPending) return <LoadingState />;
  if (session.isError) return <ErrorState message={session.error.message} onRetry={() => session.refetch()} />;
  return <InvitationScreen token={String(token ?? '')} />;
}
