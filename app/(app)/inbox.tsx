import { InboxScreen } from '../../components/correction/InboxScreen';

/** A subcontractor's findings across their jobs. */
export default function InboxRoute() {
  return <InboxScreen />;
}
