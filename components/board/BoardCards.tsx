import { Link } from 'expo-router';
import { StyleSheet, View } from 'react-native';
import type { BoardCounts, BoardLevelRow, BoardResponse } from '../../shared/schemas/board';
import { colors, space } from '../theme';
import { AppText } from '../ui/AppText';
import { Card } from '../ui/Card';
import { links } from '../links';
import { COUNT_LABELS, type BoardCountKey } from './counts';
import { CountLink, CoverageBar, OverdueShare } from './parts';
import { CeilingVerdict } from './CeilingVerdict';
import { waitingSummary } from '../../shared/rules/waiting';

/** The statuses that partition the total, then the total they add up to. */
const TILES: BoardCountKey[] = ['open', 'fixSubmitted', 'closed', 'total'];

/**
 * The levels board on a phone: the job's totals, then one card per level with the same numbers and
 * links. Open, fix submitted and closed add up to the total tile beside them; under them, the parts
 * of the open findings: how many are overdue ("2 of 5 overdue"), critical and major.
 */
export function BoardCards({ jobId, board }: { jobId: string; board: BoardResponse }) {
  const levels = [...board.levels].sort((a, b) => a.position - b.position);
  return (
    <View style={styles.list} testID="board-cards">
      <LevelCard jobId={jobId} row={board.totals} longestWaitDays={board.longestWaitDays} />
      {levels.map((l) => (
        <LevelCard key={l.levelId} jobId={jobId} row={l} longestWaitDays={l.longestWaitDays} />
      ))}
    </View>
  );
}

function LevelCard({ jobId, row, longestWaitDays }: { jobId: string; row: BoardCounts | BoardLevelRow; longestWaitDays: number | null }) {
  const level = 'levelId' in row ? row : null;
  const id = level ? level.levelId : 'total';
  const place = level ? level.name : 'all levels';
  return (
    <Card testID={`board-card-${id}`} style={level ? null : styles.totals}>
      <View style={styles.top}>
        {level ? (
          <Link href={links.level(jobId, level.levelId)} testID={`board-level-${level.levelId}`}>
            <AppText variant="title" style={styles.levelName}>
              {level.name} →
            </AppText>
          </Link>
        ) : (
          <AppText variant="title">All levels</AppText>
        )}
        {level ? (
          <CeilingVerdict
            state={level.ceilingState}
            blockers={level.ceilingBlockers}
            unchecked={level.ceilingUnitsUnchecked}
            excluded={level.ceilingUnitsExcluded}
            testID={`board-ceiling-${id}`}
          />
        ) : null}
      </View>
      <View style={styles.tiles}>
        {TILES.map((k) => (
          <View key={k} style={[styles.tile, k === 'total' ? styles.totalTile : null]}>
            <AppText variant="small" muted style={styles.tileLabel}>
              {k === 'total' ? '= Total' : COUNT_LABELS[k]}
            </AppText>
            <CountLink jobId={jobId} levelId={level?.levelId} countKey={k} value={row[k]} place={place} testID={`board-cell-${id}-${k}`} big />
          </View>
        ))}
      </View>
      {row.open > 0 ? (
        <View style={styles.ofOpen} testID={`board-of-open-${id}`}>
          <AppText variant="small" muted style={styles.tileLabel}>
            Of the {row.open} open:
          </AppText>
          <OverdueShare jobId={jobId} levelId={level?.levelId} open={row.open} overdue={row.overdue} place={place} testID={`board-cell-${id}-overdue`} big />
          <View style={styles.ofOpenRow}>
            <CountLink jobId={jobId} levelId={level?.levelId} countKey="openCritical" value={row.openCritical} place={place} testID={`board-cell-${id}-openCritical`} word="critical" />
            <CountLink jobId={jobId} levelId={level?.levelId} countKey="openMajor" value={row.openMajor} place={place} testID={`board-cell-${id}-openMajor`} word="major" />
          </View>
        </View>
      ) : null}
      {row.fixSubmitted > 0 ? (
        // Fixes submitted wait on the inspector, not on the company (never overdue): how long the oldest has waited.
        <AppText variant="small" muted testID={`board-waiting-${id}`}>
          {waitingSummary(row.fixSubmitted, longestWaitDays)}
        </AppText>
      ) : null}
      <View style={styles.cov}>
        <AppText variant="label">Units checked</AppText>
        <CoverageBar checked={row.unitsChecked} total={row.unitsTotal} testID={`board-coverage-${id}`} />
      </View>
    </Card>
  );
}

const styles = StyleSheet.create({
  list: { gap: space.md },
  totals: { backgroundColor: colors.spruceSoft, borderColor: colors.spruce },
  top: { flexDirection: 'row', justifyContent: 'space-between', alignItems: 'center', flexWrap: 'wrap', gap: space.sm },
  levelName: { color: colors.spruce },
  tiles: { flexDirection: 'row', flexWrap: 'wrap', rowGap: space.xs },
  // Equal heights in a row; the number at the foot, so a label on two lines does not push one number down.
  tile: { width: '25%', gap: 2, justifyContent: 'space-between' },
  totalTile: { borderLeftWidth: 1, borderLeftColor: colors.line },
  tileLabel: { paddingLeft: space.sm },
  ofOpen: { gap: 2 },
  ofOpenRow: { flexDirection: 'row', flexWrap: 'wrap', alignItems: 'center', gap: space.xs },
  cov: { gap: space.xs },
});
