import { JobListScreen } from '../../components/jobs/JobListScreen';

export default function HomeRoute() {
  return <JobListScreen />;
}
