import { useLocalSearchParams } from 'expo-router';
import { ModelsScreen } from '../../../../../components/setup/ModelsScreen';

export default function SetupModelsRoute() {
  const { jobId } = useLocalSearchParams<{ jobId: string }>();
  return <ModelsScreen jobId={String(jobId ?? '')} />;
}
