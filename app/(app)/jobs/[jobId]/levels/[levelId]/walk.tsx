import { useLocalSearchParams } from 'expo-router';
import { LevelWalkScreen } from '../../../../../../components/walk/LevelWalkScreen';

export default function LevelWalkRoute() {
  const { jobId, levelId, saved } = useLocalSearchParams<{ jobId: string; levelId: string; saved?: string }>();
  return <LevelWalkScreen key={`${levelId}-${saved ?? ''}`} jobId={String(jobId ?? '')} levelId={String(levelId ?? '')} saved={saved ? String(saved) : undefined} />;
}
