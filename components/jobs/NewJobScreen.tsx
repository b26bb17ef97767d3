import { Link, useRouter } from 'expo-router';
import { StyleSheet, View } from 'react-native';
import { useCreateJobMutation } from '../queries/jobs';
import { useSessionQuery } from '../queries/session';
import { colors, linkTarget, space } from '../theme';
import { AppText } from '../ui/AppText';
import { Card } from '../ui/Card';
import { Screen } from '../ui/Screen';
import { LoadingState } from '../ui/States';
import { JobForm, browserTimeZone } from './JobForm';
import { links } from '../links';

/** A GC manager describes a new job; they become its GC manager and go on to its levels. */
export function NewJobScreen() {
  const session = useSessionQuery();
  const create = useCreateJobMutation();
  const router = useRouter();
  return (
    <Screen testID="new-job-screen" maxWidth={760}>
      <Link href={links.home()} style={styles.back}>
        <AppText variant="label" style={{ color: colors.spruce }}>
          ← Your jobs
        </AppText>
      </Link>
      <View style={styles.head}>
        <AppText variant="display" role="heading">
          New job
        </AppText>
        <AppText muted>
          Start with the basics. Next you add its levels, spaces, systems and units; you can change all of it later.
        </AppText>
      </View>
      {session.isPending ? (
        <LoadingState />
      ) : (
        <Card>
          <JobForm
            testID="new-job-form"
            submitLabel="Create job"
            busy={create.isPending}
            initial={{ name: '', number: null, address: null, startsOn: null, endsOn: null, timeZone: browserTimeZone(), unitSystem: 'imperial' }}
            onSubmit={async (values) => {
              const job = await create.mutateAsync(values);
              router.replace(links.setup(job.id, 'levels'));
            }}
          />
        </Card>
      )}
    </Screen>
  );
}

const styles = StyleSheet.create({
  back: linkTarget,
  head: { gap: space.xs },
});
