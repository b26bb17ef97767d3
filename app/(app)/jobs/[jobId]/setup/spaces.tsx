import { useLocalSearchParams } from 'expo-router';
import { SpacesScreen } from '../../../../../components/setup/SpacesScreen';

export default function SetupSpacesRoute() {
  const { jobId } = useLocalSearchParams<{ jobId: string }>();
  return <SpacesScreen jobId={String(jobId ?? '')} />;
}
