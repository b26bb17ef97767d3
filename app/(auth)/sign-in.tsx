import { Redirect } from 'expo-router';
import { SignInScreen } from '../../components/auth/SignInScreen';
import { useSessionQuery } from '../../components/queries/session';
import { LoadingState } from '../../components/ui/States';
import { links } from '../../components/links';

export default function SignInRoute() {
  const session = useSessionQuery();
  if (session.isPending) return <LoadingState />;
  if (session.data?.user) return <Redirect href={links.home()} />;
  return <SignInScreen />;
}
