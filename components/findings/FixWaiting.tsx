import { daysWaiting, waitingWords } from '../../shared/rules/waiting';
import type { FindingDetail } from '../../shared/schemas/findings';
import { AppText } from '../ui/AppText';

/**
 * A fix submitted waits on the inspector, not on the company (never overdue): how long, in days
 * on the job's clock since the latest fix was submitted (a returned and fixed-again finding counts
 * from its latest fix), in the words of the board and the re-inspection queue.
 */
export function FixWaiting({ finding, timeZone, now, testID }: { finding: Pick<FindingDetail, 'status' | 'events'>; timeZone: string; now?: Date; testID?: string }) {
  if (finding.status !== 'fix_submitted') return null;
  const latest = [...finding.events].reverse().find((e) => e.kind === 'fix_submitted');
  if (!latest) return null;
  return (
    <AppText variant="label" testID={testID}>
      {waitingWords(daysWaiting(latest.at, timeZone, now))}
    </AppText>
  );
}
