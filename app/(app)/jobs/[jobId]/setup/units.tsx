import { useLocalSearchParams } from 'expo-router';
import { UnitsScreen } from '../../../../../components/setup/UnitsScreen';

export default function SetupUnitsRoute() {
  const { jobId } = useLocalSearchParams<{ jobId: string }>();
  return <UnitsScreen jobId={String(jobId ?? '')} />;
}
