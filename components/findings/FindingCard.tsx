import { Link } from 'expo-router';
import { Pressable, StyleSheet, View } from 'react-native';
import { defectCodeWords } from '../../shared/rules/somethingElse';
import type { FindingDto } from '../../shared/schemas/findings';
import { FINDING_STATUS_LABELS, type FindingStatus } from '../../shared/words';
import { KeptImage } from '../kept/KeptImage';
import { colors, radius, space, touchTarget } from '../theme';
import { AppText } from '../ui/AppText';
import { Badge } from '../ui/Badge';
import { SeverityMark } from '../walk/SeverityMark';
import { formatDay } from './due';
import { links } from '../links';

const STATUS_TONE: Record<FindingStatus, 'bad' | 'warn' | 'good' | 'neutral'> = {
  open: 'bad',
  fix_submitted: 'warn',
  closed: 'good',
  voided: 'neutral',
};
const STATUS_GLYPH: Record<FindingStatus, string> = { open: '○', fix_submitted: '◑', closed: '✓', voided: '⊘' };

/** Status as glyph and word. */
export function StatusBadge({ status, testID }: { status: FindingStatus; testID?: string }) {
  return <Badge label={`${STATUS_GLYPH[status]} ${FINDING_STATUS_LABELS[status]}`} tone={STATUS_TONE[status]} testID={testID} />;
}

/** Where a finding is: "IU-3-07 · Office 301 · Level 3". */
export function findingPlace(f: Pick<FindingDto, 'unitTag' | 'spaceName' | 'levelName'>): string {
  return [f.unitTag, f.spaceName, f.levelName].filter(Boolean).join(' · ');
}

/** A finding on a phone: number, defect, where, severity, status, company, due, first photo. */
export function FindingCard({ jobId, finding }: { jobId: string; finding: FindingDto }) {
  const f = finding;
  return (
    <Link href={links.finding(jobId, f.id)} asChild>
      <Pressable style={styles.card} testID={`finding-card-${f.number}`} accessibilityRole="link">
        <View style={styles.main}>
          <View style={styles.top}>
            <AppText variant="label" muted>
              {f.label} · {defectCodeWords(f.code)}
            </AppText>
            <StatusBadge status={f.status} />
          </View>
          <AppText variant="heading" numberOfLines={2}>
            {f.title}
          </AppText>
          <AppText variant="small" muted numberOfLines={1}>
            {findingPlace(f)}
          </AppText>
          <View style={styles.meta}>
            <SeverityMark severity={f.severity} />
            <AppText variant="small">{f.companyName}</AppText>
          </View>
          <AppText variant="small" style={f.overdue ? styles.overdue : null}>
            {f.overdue ? '⚠ Overdue · ' : 'Due '}
            {formatDay(f.dueOn)}
            {f.measuredText ? ` · measured ${f.measuredText}` : ''}
          </AppText>
        </View>
        {f.thumbUrl ? (
          <View style={styles.thumbWrap}>
            <KeptImage uri={f.thumbUrl} style={styles.thumb} accessibilityLabel={`Photo of ${f.label}`} testID={`finding-thumb-${f.number}`} />
            {f.photoCount > 1 ? (
              <AppText variant="small" muted style={styles.count}>
                +{f.photoCount - 1}
              </AppText>
            ) : null}
          </View>
        ) : null}
      </Pressable>
    </Link>
  );
}

const styles = StyleSheet.create({
  card: {
    minHeight: touchTarget + 40,
    flexDirection: 'row',
    gap: space.md,
    backgroundColor: colors.surface,
    borderRadius: radius.md,
    borderWidth: 1,
    borderColor: colors.line,
    padding: space.md,
  },
  main: { flex: 1, gap: 4, minWidth: 0 },
  top: { flexDirection: 'row', justifyContent: 'space-between', alignItems: 'center', gap: space.sm },
  meta: { flexDirection: 'row', alignItems: 'center', gap: space.sm, flexWrap: 'wrap' },
  overdue: { color: colors.danger, fontWeight: '700' },
  thumbWrap: { alignItems: 'center', gap: 2 },
  thumb: { width: 72, height: 72, borderRadius: radius.sm, backgroundColor: colors.spruceSoft },
  count: { textAlign: 'center' },
});
