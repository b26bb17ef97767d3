import { useState } from 'react';
import { View } from 'react-native';
import type { CreateJobInput, JobDetail } from '../../shared/schemas/setup';
import { JobForm } from '../jobs/JobForm';
import { useUpdateJobMutation } from '../queries/jobs';
import { AppText } from '../ui/AppText';
import { Card } from '../ui/Card';
import { Notice } from '../ui/Notice';
import { writeErrorMessage } from '../api/writeErrors';
import { isConflict } from '../api/client';
import { CopyJobCard } from './CopyJobCard';
import { SetupFrame, canEditSetup } from './SetupFrame';

export function JobDetailsScreen({ jobId }: { jobId: string }) {
  return (
    <SetupFrame jobId={jobId} section="job" title="Job details" testID="job-details-screen">
      {(job) =>
        canEditSetup(job) ? (
          <>
            <EditJob job={job} />
            <CopyJobCard job={job} />
          </>
        ) : (
          <Notice tone="info" testID="job-details-read-only">
            Only a GC manager of this job changes its details.
          </Notice>
        )
      }
    </SetupFrame>
  );
}

function toForm(job: JobDetail): CreateJobInput {
  return {
    name: job.name,
    number: job.number,
    address: job.address,
    startsOn: job.startsOn,
    endsOn: job.endsOn,
    timeZone: job.timeZone,
    unitSystem: job.unitSystem,
  };
}

function EditJob({ job }: { job: JobDetail }) {
  const update = useUpdateJobMutation(job.id);
  const [saved, setSaved] = useState(false);
  const [conflict, setConflict] = useState<string | null>(null);
  return (
    <Card>
      {conflict ? (
        <Notice tone="error" testID="job-details-conflict">
          {conflict}
        </Notice>
      ) : null}
      {saved ? (
        <Notice tone="success" testID="job-details-saved">
          Saved.
        </Notice>
      ) : null}
      <View>
        {/* Re-mount on a new version so a reload after 412 shows the current record. */}
        <JobForm
          key={job.version}
          testID="job-details-form"
          submitLabel="Save changes"
          busy={update.isPending}
          initial={toForm(job)}
          onSubmit={async (values) => {
            setSaved(false);
            setConflict(null);
            try {
              await update.mutateAsync({ input: values, version: job.version });
              setSaved(true);
            } catch (err) {
              // The form re-mounts with the current version; keep the message outside it.
              if (isConflict(err)) setConflict(writeErrorMessage(err));
              else throw err;
            }
          }}
        />
      </View>
      <AppText variant="small" muted>
        Changing the unit system changes how quantities are shown; stored values stay exact.
      </AppText>
    </Card>
  );
}
