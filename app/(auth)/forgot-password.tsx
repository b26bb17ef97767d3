import { ForgotPasswordScreen } from '../../components/auth/ForgotPasswordScreen';
import { useSessionQuery } from '../../components/queries/session';
import { ErrorState, LoadingState } from '../../components/ui/States';

export default function ForgotPasswordRoute() {
  // The session query also fetches the CSRF token the request needs.
  const session = useSessionQuery();
  if (session.isPending) return <LoadingState />;
  if (session.isError) return <ErrorState message={session.error.message} onRetry={() => session.refetch()} />;
  return <ForgotPasswordScreen />;
}
