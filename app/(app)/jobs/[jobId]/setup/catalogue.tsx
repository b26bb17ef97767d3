import { useLocalSearchParams } from 'expo-router';
import { CatalogueScreen } from '../../../../../components/setup/CatalogueScreen';

export default function SetupCatalogueRoute() {
  const { jobId } = useLocalSearchParams<{ jobId: string }>();
  return <CatalogueScreen jobId={String(jobId ?? '')} />;
}
