import { useLocalSearchParams } from 'expo-router';
import { JobSettingsScreen } from '../../../../../components/setup/JobSettingsScreen';

export default function SetupSettingsRoute() {
  const { jobId } = useLocalSearchParams<{ jobId: string }>();
  return <JobSettingsScreen jobId={String(jobId ?? '')} />;
}
