import { useLocalSearchParams } from 'expo-router';
import { TESTS_VIEW } from '../../../../../components/tests/testParams';
import { TestRecordsListScreen } from '../../../../../components/tests/TestRecordsListScreen';
import { useAddressView } from '../../../../../components/useAddressView';

/** The filters live in the address (links from readiness, a system's or level's page, a sent address). */
export default function TestRecordsRoute() {
  const { jobId } = useLocalSearchParams<{ jobId: string }>();
  const [filters, setFilters] = useAddressView(TESTS_VIEW);
  return <TestRecordsListScreen jobId={String(jobId ?? '')} filters={filters} onFiltersChange={setFilters} />;
}
