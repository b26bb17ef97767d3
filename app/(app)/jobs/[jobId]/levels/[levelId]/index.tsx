import { useLocalSearchParams } from 'expo-router';
import { LevelDetailScreen } from '../../../../../../components/board/LevelDetailScreen';

export default function LevelRoute() {
  const { jobId, levelId } = useLocalSearchParams<{ jobId: string; levelId: string }>();
  return <LevelDetailScreen key={String(levelId ?? '')} jobId={String(jobId ?? '')} levelId={String(levelId ?? '')} />;
}
