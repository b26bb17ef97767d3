import { useLocalSearchParams } from 'expo-router';
import { ReportProgressScreen } from '../../../../../components/reports/ReportProgressScreen';

export default function ReportRoute() {
  const { jobId, reportId } = useLocalSearchParams<{ jobId: string; reportId: string }>();
  return <ReportProgressScreen jobId={String(jobId ?? '')} reportId={String(reportId ?? '')} />;
}
