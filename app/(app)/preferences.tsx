import { PreferencesScreen } from '../../components/preferences/PreferencesScreen';

export default function PreferencesRoute() {
  return <PreferencesScreen />;
}
