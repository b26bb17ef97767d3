import { useLocalSearchParams } from 'expo-router';
import { ResetPasswordScreen } from '../../../components/auth/ResetPasswordScreen';
import { useSessionQuery } from '../../../components/queries/session';
import { ErrorState, LoadingState } from '../../../components/ui/States';

export default function ResetPasswordRoute() {
  const { token } = useLocalSearchParams<{ token: string }>();
  // The session query also fetches the CSRF token the write needs; a signed-in user may use the link too.
  const session = useSessionQuery();
  if (session.isPending) return <LoadingState />;
  if (session.isError) return <ErrorState message={session.error.message} onRetry={() => session.refetch()} />;
  return <ResetPasswordScreen token={String(token ?? '')} />;
}
