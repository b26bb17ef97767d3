import { useLocalSearchParams } from 'expo-router';
import { BoardScreen } from '../../../../components/board/BoardScreen';

export default function BoardRoute() {
  const { jobId, view } = useLocalSearchParams<{ jobId: string; view?: string }>();
  return <BoardScreen jobId={String(jobId ?? '')} view={view === 'table' ? 'table' : 'building'} />;
}
