import { useLocalSearchParams } from 'expo-router';
import type { PlaceKind } from '../../../../../../components/links';
import { PlanScreen } from '../../../../../../components/plans/PlanScreen';

export default function LevelPlanRoute() {
  const { jobId, levelId, place, id } = useLocalSearchParams<{ jobId: string; levelId: string; place?: string; id?: string }>();
  const kind: PlaceKind | null = place === 'finding' || place === 'unit' ? place : null;
  return (
    <PlanScreen
      key={levelId}
      jobId={String(jobId ?? '')}
      levelId={String(levelId ?? '')}
      place={kind && id ? { kind, id: String(id) } : undefined}
    />
  );
}
