import { useLocalSearchParams } from 'expo-router';
import { CompaniesScreen } from '../../../../../components/setup/CompaniesScreen';

export default function SetupCompaniesRoute() {
  const { jobId } = useLocalSearchParams<{ jobId: string }>();
  return <CompaniesScreen jobId={String(jobId ?? '')} />;
}
