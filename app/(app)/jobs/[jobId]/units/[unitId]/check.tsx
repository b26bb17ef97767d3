import { useLocalSearchParams } from 'expo-router';
import { UnitCheckScreen } from '../../../../../../components/walk/UnitCheckScreen';

export default function UnitCheckRoute() {
  const { jobId, unitId, saved } = useLocalSearchParams<{ jobId: string; unitId: string; saved?: string }>();
  return <UnitCheckScreen key={String(unitId ?? '')} jobId={String(jobId ?? '')} unitId={String(unitId ?? '')} saved={saved ? String(saved) : undefined} />;
}
