import { useLocalSearchParams } from 'expo-router';
import { ScorecardsScreen } from '../../../../components/board/ScorecardsScreen';
import { SCORECARDS_VIEW } from '../../../../components/board/scorecardParams';
import { useAddressView } from '../../../../components/useAddressView';

/** The order lives in the address (?sort=name, ?sort=-open; most overdue first is the plain address). */
export default function ScorecardsRoute() {
  const { jobId } = useLocalSearchParams<{ jobId: string }>();
  const [sort, setSort] = useAddressView(SCORECARDS_VIEW);
  return <ScorecardsScreen jobId={String(jobId ?? '')} sort={sort} onSortChange={setSort} />;
}
