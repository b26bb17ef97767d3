import { useLocalSearchParams } from 'expo-router';
import { AuditPlanScreen } from '../../../../../components/audits/AuditPlanScreen';

export default function NewAuditRoute() {
  const { jobId } = useLocalSearchParams<{ jobId: string }>();
  return <AuditPlanScreen jobId={String(jobId ?? '')} />;
}
