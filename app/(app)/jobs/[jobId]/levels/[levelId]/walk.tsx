import { useLocalSearchParams } from 'expo-router';
import { LevelWalkScreen } from '../../../../../../components/walk/LevelWalkScreen';
import { WALK_VIEW } from '../../../../../../components/walk/walkParams';
import { useAddressView } from '../../../../../../components/useAddressView';

/** The unit filters live in the address (a reload or a sent address shows the same units). */
export default function LevelWalkRoute() {
  const { jobId, levelId, saved } = useLocalSearchParams<{ jobId: string; levelId: string; saved?: string }>();
  const [filters, setFilters] = useAddressView(WALK_VIEW);
  return (
    <LevelWalkScreen
      key={`${levelId}-${saved ?? ''}`}
      jobId={String(jobId ?? '')}
      levelId={String(levelId ?? '')}
      saved={saved ? String(saved) : undefined}
      filters={filters}
      onFiltersChange={setFilters}
    />
  );
}
