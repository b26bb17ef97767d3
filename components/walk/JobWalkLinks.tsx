import { links } from '../links';
import { Link } from 'expo-router';
import { StyleSheet, View } from 'react-native';
import type { Role } from '../../shared/words';
import { space } from '../theme';
import { Button } from '../ui/Button';

/** The job's way into the walk and the findings (on the job's overview). */
export function JobWalkLinks({ jobId, role }: { jobId: string; role: Role }) {
  return (
    <View style={styles.row} testID="job-walk-links">
      {role !== 'subcontractor' ? (
        <Link href={links.walk(jobId)} asChild>
          <Button label="Walk a level" testID="job-walk" style={styles.grow} />
        </Link>
      ) : null}
      {role !== 'subcontractor' ? (
        <Link href={links.scan(jobId)} asChild>
          <Button label="Scan a unit" tone="secondary" testID="job-scan" style={styles.grow} />
        </Link>
      ) : null}
      <Link href={links.findings(jobId)} asChild>
        <Button label="Findings" tone="secondary" testID="job-findings" style={styles.grow} />
      </Link>
      <Link href={links.tests(jobId)} asChild>
        <Button label="Test records" tone="secondary" testID="job-tests" style={styles.grow} />
      </Link>
      {role !== 'subcontractor' ? (
        <Link href={links.audits(jobId)} asChild>
          <Button label="Audits" tone="secondary" testID="job-audits" style={styles.grow} />
        </Link>
      ) : null}
      {role !== 'subcontractor' ? (
        <Link href={links.reinspections(jobId)} asChild>
          <Button label="Re-inspections" tone="secondary" testID="job-reinspections" style={styles.grow} />
        </Link>
      ) : (
        <Link href={links.inbox()} asChild>
          <Button label="Findings to fix" tone="secondary" testID="job-inbox" style={styles.grow} />
        </Link>
      )}
    </View>
  );
}

const styles = StyleSheet.create({
  row: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm },
  grow: { flexGrow: 1, flexBasis: 160 },
});
