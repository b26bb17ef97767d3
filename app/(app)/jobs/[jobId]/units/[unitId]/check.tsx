import { useLocalSearchParams } from 'expo-router';
import { UnitCheckScreen } from '../../../../../../components/walk/UnitCheckScreen';

export default function UnitCheckRoute() {
  const { jobId, unitId } = useLocalSearchParams<{ jobId: string; unitId: string }>();
  return <UnitCheckScreen key={String(unitId ?? '')} jobId={String(jobId ?? '')} unitId={String(unitId ?? '')} />;
}
