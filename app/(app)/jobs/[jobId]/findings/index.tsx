import { useLocalSearchParams } from 'expo-router';
import { FindingsListScreen } from '../../../../../components/findings/FindingsListScreen';
import { FINDINGS_VIEW } from '../../../../../components/findings/filterParams';
import { useAddressView } from '../../../../../components/useAddressView';

/** The filters and sort live in the address (links from a level's walk, the levels board, readiness, a sent address); changing them rewrites it. */
export default function FindingsRoute() {
  const { jobId } = useLocalSearchParams<{ jobId: string }>();
  const [filters, setFilters] = useAddressView(FINDINGS_VIEW);
  return <FindingsListScreen jobId={String(jobId ?? '')} filters={filters} onFiltersChange={setFilters} />;
}
