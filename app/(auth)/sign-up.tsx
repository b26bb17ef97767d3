import { Redirect } from 'expo-router';
import { SignUpScreen } from '../../components/auth/SignUpScreen';
import { useSessionQuery } from '../../components/queries/session';
import { LoadingState } from '../../components/ui/States';
import { links } from '../../components/links';

export default function SignUpRoute() {
  const session = useSessionQuery();
  if (session.isPending) return <LoadingState />;
  if (session.data?.user) return <Redirect href={links.home()} />;
  return <SignUpScreen />;
}
