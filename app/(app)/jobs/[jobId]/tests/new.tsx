import { useLocalSearchParams } from 'expo-router';
import { NewTestRecordScreen } from '../../../../../components/tests/NewTestRecordScreen';

export default function NewTestRecordRoute() {
  const p = useLocalSearchParams<{ jobId: string; kind?: string; systemId?: string; unitId?: string; levelId?: string; supersedesId?: string }>();
  const key = [p.kind, p.systemId, p.unitId, p.supersedesId].join('|');
  return (
    <NewTestRecordScreen
      key={key}
      jobId={String(p.jobId ?? '')}
      params={{
        kind: p.kind || undefined,
        systemId: p.systemId || undefined,
        unitId: p.unitId || undefined,
        levelId: p.levelId || undefined,
        supersedesId: p.supersedesId || undefined,
      }}
    />
  );
}
