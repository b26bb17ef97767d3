import { router } from 'expo-router';
import { StyleSheet, View } from 'react-native';
import { ApiError } from '../api/client';
import { ExportLink } from '../exports/ExportLink';
import { links } from '../links';
import { useStartReportMutation } from '../queries/reports';
import { space } from '../theme';
import { AppText } from '../ui/AppText';
import { Button } from '../ui/Button';
import { reportUrls, type ReportPlace } from './reportUrls';

export interface ReportActionsProps {
  jobId: string;
  /** What the close-out report covers (nothing: the whole job; a subcontractor's is their company's either way). */
  place?: ReportPlace;
  /** Offer the crew punch list of this level (and company: a subcontractor's own when not given). */
  crewList?: { levelId: string; companyId?: string; label?: string } | null;
  /** Words after "Close-out report" on the button ("of this level"). */
  what?: string;
  testID: string;
}

/**
 * The reports a screen offers: the close-out report (asked for, then built on the server with its
 * progress shown on the report's page, however large), and where it makes sense the crew punch
 * list, a plain download. Navigates with the imperative router (only on a press), so the screens
 * that hold it render in tests without a navigation container.
 */
export function ReportActions({ jobId, place = {}, crewList, what, testID }: ReportActionsProps) {
  const start = useStartReportMutation(jobId);
  const ask = () => {
    if (start.isPending) return;
    start.mutate(
      { kind: 'close-out', ...place },
      { onSuccess: (run) => router.push(links.report(jobId, run.id)) },
    );
  };
  return (
    <View style={styles.row} testID={testID}>
      <Button
        label={`Close-out report${what ? ` ${what}` : ''} (PDF)`}
        tone="secondary"
        busy={start.isPending}
        onPress={ask}
        testID={`${testID}-close-out`}
      />
      {crewList ? (
        <ExportLink
          href={reportUrls.crewListPdf(jobId, { levelId: crewList.levelId, companyId: crewList.companyId })}
          label={crewList.label ?? 'Crew punch list (PDF)'}
          testID={`${testID}-crew-list`}
        />
      ) : null}
      {start.isError ? (
        <AppText variant="small" role="alert" testID={`${testID}-error`}>
          {start.error instanceof ApiError ? start.error.message : 'The report could not be asked for. Check the connection and try again.'}
        </AppText>
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({
  row: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm, alignItems: 'center' },
});
