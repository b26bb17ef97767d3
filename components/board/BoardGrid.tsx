import { Link } from 'expo-router';
import { StyleSheet, View } from 'react-native';
import type { BoardCounts, BoardLevelRow, BoardResponse } from '../../shared/schemas/board';
import { colors, radius, space } from '../theme';
import { AppText } from '../ui/AppText';
import { SeverityShape } from '../walk/SeverityMark';
import { links } from '../links';
import type { BoardCountKey } from './counts';
import { CountLink, CoverageBar, OverdueShare } from './parts';
import { CeilingVerdict } from './CeilingVerdict';
import { waitingSummary } from '../../shared/rules/waiting';

interface Col {
  key: string;
  title: string;
  /** A second line under the title: what the column counts, in relation to the others. */
  caption?: string;
  flex: number;
  count?: BoardCountKey;
  shape?: 'critical' | 'major';
  /** A rule on the left: the partition (open, fix submitted, closed) and its total read as one group. */
  ruled?: boolean;
}

const COLS: Col[] = [
  { key: 'level', title: 'Level', flex: 1.1 },
  { key: 'open', title: 'Open', caption: 'new or returned', flex: 1.2, count: 'open', ruled: true },
  { key: 'openCritical', title: 'Critical', caption: 'of open', flex: 0.75, count: 'openCritical', shape: 'critical' },
  { key: 'openMajor', title: 'Major', caption: 'of open', flex: 0.75, count: 'openMajor', shape: 'major' },
  { key: 'fixSubmitted', title: 'Fix submitted', flex: 1, count: 'fixSubmitted', ruled: true },
  { key: 'closed', title: 'Closed', flex: 0.75, count: 'closed', ruled: true },
  { key: 'total', title: 'Total', caption: '= open + fix submitted + closed', flex: 1.25, count: 'total', ruled: true },
  { key: 'coverage', title: 'Units checked', flex: 1.2, ruled: true },
  { key: 'ceilings', title: 'Ceilings', flex: 1.3 },
];

/**
 * The levels board on a wide screen: one row per level in building order, a column per count,
 * and the job's totals last. Each count opens the findings behind it, already filtered.
 * Open, fix submitted and closed partition the total, which is shown; critical and major are the
 * open findings of that severity (parts of "Open", captioned so), and overdue is a share of the
 * open findings under Open ("2 of 5 overdue"), never a column beside the statuses.
 */
export function BoardGrid({ jobId, board }: { jobId: string; board: BoardResponse }) {
  const levels = [...board.levels].sort((a, b) => a.position - b.position);
  return (
    <View style={styles.table} role="table" testID="board-grid" aria-label="Levels board">
      <View style={[styles.row, styles.head]} role="row">
        {COLS.map((c) => (
          <View key={c.key} style={[styles.cell, styles.headCell, { flex: c.flex }, c.ruled ? styles.ruled : null]} role="columnheader" testID={`board-head-${c.key}`}>
            <View style={styles.headInner}>
              {c.shape ? <SeverityShape severity={c.shape} size={12} /> : null}
              <AppText variant="label" muted>
                {c.title}
              </AppText>
            </View>
            {c.caption ? (
              <AppText variant="small" muted>
                {c.caption}
              </AppText>
            ) : null}
          </View>
        ))}
      </View>
      {levels.map((l, i) => (
        <Row key={l.levelId} jobId={jobId} row={l} zebra={i % 2 === 1} longestWaitDays={l.longestWaitDays} />
      ))}
      <Row jobId={jobId} row={board.totals} totals longestWaitDays={board.longestWaitDays} />
    </View>
  );
}

function Row({
  jobId,
  row,
  zebra,
  totals,
  longestWaitDays,
}: {
  jobId: string;
  row: BoardCounts | BoardLevelRow;
  zebra?: boolean;
  totals?: boolean;
  longestWaitDays: number | null;
}) {
  const level = 'levelId' in row ? row : null;
  const id = level ? level.levelId : 'total';
  const place = level ? level.name : 'all levels';
  return (
    <View style={[styles.row, zebra ? styles.zebra : null, totals ? styles.totals : null]} role="row" testID={`board-row-${id}`}>
      {COLS.map((c) => {
        let content: React.ReactNode = null;
        if (c.key === 'level') {
          content = level ? (
            <Link href={links.level(jobId, level.levelId)} testID={`board-level-${level.levelId}`}>
              <AppText variant="heading" style={styles.levelName}>
                {level.name}
              </AppText>
            </Link>
          ) : (
            <AppText variant="heading">All levels</AppText>
          );
        } else if (c.count === 'fixSubmitted' && row.fixSubmitted > 0 && longestWaitDays !== null) {
          // Waiting on the inspector, not the company: the count and how long the oldest has waited.
          content = (
            <View>
              <CountLink jobId={jobId} levelId={level?.levelId} countKey={c.count} value={row[c.count]} place={place} testID={`board-cell-${id}-${c.count}`} />
              <AppText variant="small" muted testID={`board-waiting-${id}`} accessibilityLabel={waitingSummary(row.fixSubmitted, longestWaitDays)}>
                {longestWaitDays <= 0 ? 'since today' : `longest ${longestWaitDays} day${longestWaitDays === 1 ? '' : 's'}`}
              </AppText>
            </View>
          );
        } else if (c.count === 'open') {
          // Overdue is a share of the open findings, under them: not a status of its own.
          content = (
            <View>
              <CountLink jobId={jobId} levelId={level?.levelId} countKey="open" value={row.open} place={place} testID={`board-cell-${id}-open`} />
              <OverdueShare jobId={jobId} levelId={level?.levelId} open={row.open} overdue={row.overdue} place={place} testID={`board-cell-${id}-overdue`} />
            </View>
          );
        } else if (c.count) {
          content = <CountLink jobId={jobId} levelId={level?.levelId} countKey={c.count} value={row[c.count]} place={place} testID={`board-cell-${id}-${c.count}`} />;
        } else if (c.key === 'coverage') {
          content = <CoverageBar checked={row.unitsChecked} total={row.unitsTotal} testID={`board-coverage-${id}`} />;
        } else if (c.key === 'ceilings') {
          content = level ? (
            <Link href={links.level(jobId, level.levelId)} testID={`board-ceiling-${id}`}>
              <CeilingVerdict state={level.ceilingState} blockers={level.ceilingBlockers} unchecked={level.ceilingUnitsUnchecked} excluded={level.ceilingUnitsExcluded} tests={level.ceilingTestBlockers} short />
            </Link>
          ) : null;
        }
        return (
          <View key={c.key} style={[styles.cell, { flex: c.flex }, c.ruled ? styles.ruled : null, c.key === 'total' ? styles.total : null]} role={c.key === 'level' ? 'rowheader' : 'cell'}>
            {content}
          </View>
        );
      })}
    </View>
  );
}

const styles = StyleSheet.create({
  table: { borderWidth: 1, borderColor: colors.line, borderRadius: radius.md, backgroundColor: colors.surface, overflow: 'hidden' },
  row: { flexDirection: 'row', borderBottomWidth: 1, borderBottomColor: colors.line, alignItems: 'center' },
  head: { backgroundColor: colors.paper, alignItems: 'flex-end' },
  headInner: { flexDirection: 'row', alignItems: 'center', gap: 4 },
  zebra: { backgroundColor: '#FAF8F3' },
  totals: { backgroundColor: colors.spruceSoft, borderTopWidth: 2, borderTopColor: colors.spruce, borderBottomWidth: 0 },
  cell: { paddingHorizontal: space.sm, paddingVertical: space.sm, minWidth: 0, alignSelf: 'stretch', justifyContent: 'center' },
  headCell: { justifyContent: 'flex-end' },
  ruled: { borderLeftWidth: 1, borderLeftColor: colors.line },
  total: { backgroundColor: 'rgba(0,0,0,0.03)' },
  levelName: { color: colors.spruce, textDecorationLine: 'underline' },
});
