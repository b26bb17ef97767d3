import { Link } from 'expo-router';
import { StyleSheet, View } from 'react-native';
import type { BoardCounts, BoardLevelRow, BoardResponse } from '../../shared/schemas/board';
import { colors, space } from '../theme';
import { AppText } from '../ui/AppText';
import { Card } from '../ui/Card';
import { links } from '../links';
import { CoverageBar, StatusTiles } from './parts';
import { CeilingVerdict } from './CeilingVerdict';
import { waitingSummary } from '../../shared/rules/waiting';


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
            tests={level.ceilingTestBlockers}
            testID={`board-ceiling-${id}`}
          />
        ) : null}
      </View>
      <StatusTiles jobId={jobId} levelId={level?.levelId} row={row} place={place} cellTestID={(k) => `board-cell-${id}-${k}`} ofOpenTestID={`board-of-open-${id}`} />
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
  cov: { gap: space.xs },
});
