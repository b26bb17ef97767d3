import { useLocalSearchParams } from 'expo-router';
import { BoardScreen } from '../../../../components/board/BoardScreen';

export default function BoardRoute() {
  const { jobId } = useLocalSearchParams<{ jobId: string }>();
  return <BoardScreen jobId={String(jobId ?? '')} />;
}
