import { useLocalSearchParams } from 'expo-router';
import { ScanUnitScreen } from '../../../../components/scan/ScanUnitScreen';

export default function ScanUnitRoute() {
  const { jobId } = useLocalSearchParams<{ jobId: string }>();
  return <ScanUnitScreen jobId={String(jobId ?? '')} />;
}
