import { useLocalSearchParams } from 'expo-router';
import { TestRecordScreen } from '../../../../../components/tests/TestRecordScreen';

export default function TestRecordRoute() {
  const { jobId, recordId } = useLocalSearchParams<{ jobId: string; recordId: string }>();
  return <TestRecordScreen key={String(recordId ?? '')} jobId={String(jobId ?? '')} recordId={String(recordId ?? '')} />;
}
