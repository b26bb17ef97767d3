import { useLocalSearchParams } from 'expo-router';
import { MembersScreen } from '../../../../../components/setup/MembersScreen';

export default function SetupMembersRoute() {
  const { jobId } = useLocalSearchParams<{ jobId: string }>();
  return <MembersScreen jobId={String(jobId ?? '')} />;
}
