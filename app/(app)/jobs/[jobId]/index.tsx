import { useLocalSearchParams } from 'expo-router';
import { JobOverviewScreen } from '../../../../components/jobs/JobOverviewScreen';

export default function JobRoute() {
  const { jobId } = useLocalSearchParams<{ jobId: string }>();
  return <JobOverviewScreen jobId={String(jobId ?? '')} />;
}
