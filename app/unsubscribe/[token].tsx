import { useLocalSearchParams } from 'expo-router';
import { UnsubscribeScreen } from '../../components/preferences/UnsubscribeScreen';

/** From a digest's "Stop these digests" link: no sign-in needed (the signed link is the permission). */
export default function UnsubscribeRoute() {
  const { token } = useLocalSearchParams<{ token: string }>();
  return <UnsubscribeScreen token={String(token ?? '')} />;
}
