import { useLocalSearchParams } from 'expo-router';
import { LevelsScreen } from '../../../../../components/setup/LevelsScreen';

export default function SetupLevelsRoute() {
  const { jobId } = useLocalSearchParams<{ jobId: string }>();
  return <LevelsScreen jobId={String(jobId ?? '')} />;
}
