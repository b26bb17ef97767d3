import { Link } from 'expo-router';
import { Screen } from '../components/ui/Screen';
import { EmptyState } from '../components/ui/States';
import { AppText } from '../components/ui/AppText';
import { colors } from '../components/theme';
import { links } from '../components/links';

export default function NotFound() {
  return (
    <Screen testID="not-found-screen" main>
      <EmptyState title="Nothing here" body="This page does not exist." level={1} />
      <Link href={links.home()} style={{ alignSelf: 'center' }}>
        <AppText variant="label" style={{ color: colors.spruce }}>
          Go to your jobs
        </AppText>
      </Link>
    </Screen>
  );
}
