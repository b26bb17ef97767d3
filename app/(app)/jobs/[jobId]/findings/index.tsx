import { useLocalSearchParams } from 'expo-router';
import { FindingsListScreen } from '../../../../../components/findings/FindingsListScreen';

/** Filters may arrive in the address (from a level's walk: ?levelId=…). */
export default function FindingsRoute() {
  const { jobId, levelId, unitId, spaceId } = useLocalSearchParams<{ jobId: string; levelId?: string; unitId?: string; spaceId?: string }>();
  const initial = { levelId: levelId || undefined, unitId: unitId || undefined, spaceId: spaceId || undefined };
  return <FindingsListScreen key={`${levelId ?? ''}-${unitId ?? ''}-${spaceId ?? ''}`} jobId={String(jobId ?? '')} initial={initial} />;
}
