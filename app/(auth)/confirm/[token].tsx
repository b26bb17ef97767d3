import { useLocalSearchParams } from 'expo-router';
import { ConfirmEmailScreen } from '../../../components/auth/ConfirmEmailScreen';
import { useSessionQuery } from '../../../components/queries/session';
import { ErrorState, LoadingState } from '../../../components/ui/States';

export default function ConfirmEmailRoute() {
  const { token } = useLocalSearchParams<{ token: string }>();
  // The session query also fetches the CSRF token the write needs; a signed-in user may use the link too.
  const session = useSessionQuery();
  if (session.isPending) return <LoadingState />;
  if (session.isError) return <ErrorState message={session.error.message} onRetry={() => session.refetch()} />;
  return <ConfirmEmailScreen token={String(token ?? '')} />;
}
