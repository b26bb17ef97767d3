import { StyleSheet, View } from 'react-native';
import { space } from '../theme';
import { AppText } from '../ui/AppText';
import { ReportActions } from './ReportActions';

/** Under the company scorecards: each company's close-out report (its findings, photos and open items). */
export function CompanyReports({ jobId, companies }: { jobId: string; companies: readonly { companyId: string; name: string }[] }) {
  if (companies.length === 0) return null;
  return (
    <View style={styles.block} testID="company-reports">
      <AppText variant="heading" role="heading">
        Close-out report per company
      </AppText>
      {companies.map((c) => (
        <View key={c.companyId} style={styles.row}>
          <AppText variant="label" style={styles.name}>
            {c.name}
          </AppText>
          <ReportActions jobId={jobId} place={{ companyId: c.companyId }} testID={`company-report-${c.companyId}`} />
        </View>
      ))}
    </View>
  );
}

const styles = StyleSheet.create({
  block: { gap: space.sm },
  row: { flexDirection: 'row', flexWrap: 'wrap', alignItems: 'center', gap: space.sm },
  name: { minWidth: 200, flexGrow: 1 },
});
