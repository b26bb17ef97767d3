import { useLocalSearchParams } from 'expo-router';
import { ReadinessScreen } from '../../../../components/board/ReadinessScreen';

const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

/** ?systemId=… shows one system (its readiness screen). */
export default function ReadinessRoute() {
  const { jobId, systemId } = useLocalSearchParams<{ jobId: string; systemId?: string }>();
  const system = systemId && UUID.test(String(systemId)) ? String(systemId) : undefined;
  return <ReadinessScreen key={system ?? 'all'} jobId={String(jobId ?? '')} systemId={system} />;
}
