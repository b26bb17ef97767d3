import { useLocalSearchParams } from 'expo-router';
import { FindingDetailScreen } from '../../../../../components/findings/FindingDetailScreen';

export default function FindingRoute() {
  const { jobId, findingId } = useLocalSearchParams<{ jobId: string; findingId: string }>();
  return <FindingDetailScreen key={String(findingId ?? '')} jobId={String(jobId ?? '')} findingId={String(findingId ?? '')} />;
}
