import { useLocalSearchParams } from 'expo-router';
import { ScorecardsScreen } from '../../../../components/board/ScorecardsScreen';

export default function ScorecardsRoute() {
  const { jobId } = useLocalSearchParams<{ jobId: string }>();
  return <ScorecardsScreen jobId={String(jobId ?? '')} />;
}
