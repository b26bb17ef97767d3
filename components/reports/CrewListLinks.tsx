import { StyleSheet, View } from 'react-native';
import { ExportLink } from '../exports/ExportLink';
import { useJobCompaniesQuery } from '../queries/companies';
import { space } from '../theme';
import { AppText } from '../ui/AppText';
import { reportUrls } from './reportUrls';

/**
 * For the GC manager and the inspector on a level: one crew punch list per subcontracting company
 * (the GC's own company is left out). A subcontractor gets their own list from ReportActions.
 */
export function CrewListLinks({ jobId, levelId, testID }: { jobId: string; levelId: string; testID: string }) {
  const companies = useJobCompaniesQuery(jobId);
  const subs = (companies.data ?? []).filter((c) => !c.isOwner);
  if (subs.length === 0) return null;
  return (
    <View style={styles.block} testID={testID}>
      <AppText variant="label">Crew punch lists (PDF, printable in black and white)</AppText>
      <View style={styles.row}>
        {subs.map((c) => (
          <ExportLink key={c.id} href={reportUrls.crewListPdf(jobId, { companyId: c.id, levelId })} label={c.name} testID={`${testID}-${c.id}`} />
        ))}
      </View>
    </View>
  );
}

const styles = StyleSheet.create({
  block: { gap: space.xs },
  row: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm },
});
