import { useLocalSearchParams } from 'expo-router';
import { FindingsListScreen } from '../../../../../components/findings/FindingsListScreen';
import { findingFiltersFromParams, filtersKey } from '../../../../../components/findings/filterParams';

/** Filters may arrive in the address (from a level's walk: ?levelId=…; from the levels board: ?levelId&status&severity&overdue …). */
export default function FindingsRoute() {
  const { jobId, ...params } = useLocalSearchParams<Record<string, string>>();
  const initial = findingFiltersFromParams(params);
  return <FindingsListScreen key={filtersKey(initial)} jobId={String(jobId ?? '')} initial={initial} />;
}
