import { useLocalSearchParams } from 'expo-router';
import { WalkLevelsScreen } from '../../../../components/walk/WalkLevelsScreen';

export default function WalkLevelsRoute() {
  const { jobId } = useLocalSearchParams<{ jobId: string }>();
  return <WalkLevelsScreen jobId={String(jobId ?? '')} />;
}
