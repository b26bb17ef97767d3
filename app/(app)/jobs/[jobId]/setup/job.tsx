import { useLocalSearchParams } from 'expo-router';
import { JobDetailsScreen } from '../../../../../components/setup/JobDetailsScreen';

export default function SetupJobRoute() {
  const { jobId } = useLocalSearchParams<{ jobId: string }>();
  return <JobDetailsScreen jobId={String(jobId ?? '')} />;
}
