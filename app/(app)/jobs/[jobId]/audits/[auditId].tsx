import { useLocalSearchParams } from 'expo-router';
import { AuditScreen } from '../../../../../components/audits/AuditScreen';

export default function AuditRoute() {
  const { jobId, auditId } = useLocalSearchParams<{ jobId: string; auditId: string }>();
  return <AuditScreen key={String(auditId ?? '')} jobId={String(jobId ?? '')} auditId={String(auditId ?? '')} />;
}
