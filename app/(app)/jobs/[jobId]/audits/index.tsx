import { useLocalSearchParams } from 'expo-router';
import { AuditsListScreen } from '../../../../../components/audits/AuditsListScreen';

export default function AuditsRoute() {
  const { jobId } = useLocalSearchParams<{ jobId: string }>();
  return <AuditsListScreen jobId={String(jobId ?? '')} />;
}
