import { useLocalSearchParams } from 'expo-router';
import { SystemsScreen } from '../../../../../components/setup/SystemsScreen';

export default function SetupSystemsRoute() {
  const { jobId } = useLocalSearchParams<{ jobId: string }>();
  return <SystemsScreen jobId={String(jobId ?? '')} />;
}
