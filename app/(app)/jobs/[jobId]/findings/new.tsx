import { useLocalSearchParams } from 'expo-router';
import { NewFindingScreen } from '../../../../../components/findings/NewFindingScreen';

export default function NewFindingRoute() {
  const p = useLocalSearchParams<{ jobId: string; unitId?: string; spaceId?: string; levelId?: string; catalogueItemId?: string; measuredText?: string; walkId?: string }>();
  return (
    <NewFindingScreen
      jobId={String(p.jobId ?? '')}
      params={{
        unitId: p.unitId || undefined,
        spaceId: p.spaceId || undefined,
        levelId: p.levelId || undefined,
        catalogueItemId: p.catalogueItemId || undefined,
        measuredText: p.measuredText || undefined,
        walkId: p.walkId || undefined,
      }}
    />
  );
}
