import { useLocalSearchParams } from 'expo-router';
import { ImportUnitsScreen } from '../../../../../components/setup/ImportUnitsScreen';

export default function SetupImportRoute() {
  const { jobId } = useLocalSearchParams<{ jobId: string }>();
  return <ImportUnitsScreen jobId={String(jobId ?? '')} />;
}
