import { zodResolver } from '@hookform/resolvers/zod';
import { useRouter } from 'expo-router';
import { useForm } from 'react-hook-form';
import { StyleSheet, View } from 'react-native';
import { copyJobSchema, type CopyJobInput, type JobDetail } from '../../shared/schemas/setup';
import { useCopyJobMutation } from '../queries/jobs';
import { links } from '../links';
import { AppText } from '../ui/AppText';
import { Button } from '../ui/Button';
import { Card } from '../ui/Card';
import { FormBanner } from '../ui/FormBanner';
import { FormText } from '../ui/FormFields';
import { showServerErrors } from './formErrors';

const FIELDS = ['name', 'number', 'address', 'startsOn', 'endsOn'] as const;

/**
 * Start the next building of the same kind from this one: the new job gets this job's levels,
 * spaces, models, catalogue, settings and companies, and opens on its own details.
 */
export function CopyJobCard({ job }: { job: JobDetail }) {
  const copy = useCopyJobMutation(job.id);
  const router = useRouter();
  const { control, handleSubmit, setError } = useForm<CopyJobInput>({
    resolver: zodResolver(copyJobSchema),
    defaultValues: { name: '', number: null, address: null, startsOn: null, endsOn: null },
  });
  const submit = handleSubmit(async (values) => {
    try {
      const created = await copy.mutateAsync(values);
      router.replace(links.setup(created.id, 'job'));
    } catch (err) {
      showServerErrors(err, setError, FIELDS);
    }
  });
  return (
    <Card testID="copy-job">
      <AppText variant="title" role="heading" aria-level={2}>
        Copy this job
      </AppText>
      <AppText muted>
        A new job with the same levels, spaces and the openings between them, unit models, defect catalogue as chosen here, settings, and
        companies with their crews. Units, systems, checks, findings, test records, plans and people are not copied: you are the new job’s GC
        manager and invite the others again.
      </AppText>
      <View>
        <FormBanner control={control} testID="copy-job-error" />
        <FormText control={control} name="name" label="New job name" testID="copy-job-name" placeholder={`e.g. ${job.name}, second building`} />
        <FormText control={control} name="number" label="Job number (optional)" testID="copy-job-number" nullable />
        <Button testID="copy-job-submit" label="Copy to a new job" tone="secondary" onPress={submit} busy={copy.isPending} style={styles.submit} />
      </View>
    </Card>
  );
}

const styles = StyleSheet.create({
  submit: { alignSelf: 'flex-start' },
});
