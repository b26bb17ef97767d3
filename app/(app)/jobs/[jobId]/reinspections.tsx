import { useLocalSearchParams } from 'expo-router';
import { ReinspectionQueueScreen } from '../../../../components/correction/ReinspectionQueueScreen';

/** Fixes waiting for the inspector, grouped by level. */
export default function ReinspectionsRoute() {
  const { jobId } = useLocalSearchParams<{ jobId: string }>();
  return <ReinspectionQueueScreen key={String(jobId ?? '')} jobId={String(jobId ?? '')} />;
}
