import { useLocalSearchParams } from 'expo-router';
import { CrewsScreen } from '../../../../../components/setup/CrewsScreen';

export default function SetupCrewsRoute() {
  const { jobId } = useLocalSearchParams<{ jobId: string }>();
  return <CrewsScreen jobId={String(jobId ?? '')} />;
}
