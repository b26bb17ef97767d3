import { SyncScreen } from '../../components/outbox/SyncScreen';

export default function SyncRoute() {
  return <SyncScreen />;
}
