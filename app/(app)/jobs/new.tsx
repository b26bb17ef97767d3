import { NewJobScreen } from '../../../components/jobs/NewJobScreen';

export default function NewJobRoute() {
  return <NewJobScreen />;
}
