import { Link } from 'expo-router';
import { Pressable, StyleSheet, View } from 'react-native';
import type { BoardLevelRow, BoardResponse, FloorSystem } from '../../shared/schemas/board';
import type { Severity } from '../../shared/words';
import { colors, radius, space } from '../theme';
import { AppText } from '../ui/AppText';
import { useWide } from '../ui/useWide';
import { SeverityShape } from '../walk/SeverityMark';
import { links } from '../links';
import { CoverageBar } from './parts';
import { floorReadiness, floorSystemNotes, openBySeverity } from './floorWords';

/**
 * The levels board as the building: a stack of floors, roof on top, ground at the bottom. Each
 * floor is a band with its coverage (units checked of units), its open findings by severity and
 * the fixes waiting, and its readiness in words; the systems over their refrigerant limit, or
 * waiting for test records, are named on the floors they serve. The readiness words carry the
 * meaning; the band's edge colour only supports them.
 */
export function BuildingStack({ jobId, board, systems }: { jobId: string; board: BoardResponse; systems: FloorSystem[] | undefined }) {
  // Roof on top: the highest position first.
  const floors = [...board.levels].sort((a, b) => b.position - a.position);
  return (
    <View style={styles.building} testID="board-building" accessibilityLabel={`The building, ${floors.length} levels, top level first`}>
      <View style={styles.roof} aria-hidden />
      {floors.map((row) => (
        <Floor key={row.levelId} jobId={jobId} row={row} systems={(systems ?? []).filter((s) => s.levelIds.includes(row.levelId))} />
      ))}
      <View style={styles.ground} aria-hidden />
    </View>
  );
}

const EDGE = { ready: colors.good, blocked: colors.danger, waiting: colors.ochre, none: colors.line } as const;

function Floor({ jobId, row, systems }: { jobId: string; row: BoardLevelRow; systems: FloorSystem[] }) {
  const readiness = floorReadiness(row);
  const open = openBySeverity(row);
  const notes = floorSystemNotes(systems);
  const id = row.levelId;
  const wide = useWide();
  return (
    <View style={[styles.floor, { borderLeftColor: EDGE[readiness.tone] }]} testID={`floor-${id}`}>
      <View style={wide ? styles.topWide : styles.top}>
        <Link href={links.level(jobId, id)} testID={`floor-${id}-name`}>
          <AppText variant="title" style={styles.name}>
            {row.name} →
          </AppText>
        </Link>
        <AppText variant="label" style={[styles.readiness, { color: readiness.tone === 'ready' ? colors.good : readiness.tone === 'blocked' ? colors.danger : colors.ink }]} testID={`floor-${id}-readiness`}>
          {readiness.tone === 'ready' ? '✓ ' : readiness.tone === 'blocked' ? '✕ ' : ''}
          {readiness.words}
        </AppText>
      </View>
      <View style={styles.coverage}>
        <AppText variant="small" muted testID={`floor-${id}-coverage`}>
          Units checked
        </AppText>
        <View style={styles.bar}>
          <CoverageBar checked={row.unitsChecked} total={row.unitsTotal} testID={`floor-${id}-coverage-bar`} />
        </View>
      </View>
      <View style={styles.counts} testID={`floor-${id}-open`}>
        {open.length === 0 && row.fixSubmitted === 0 ? (
          <AppText variant="small" muted>
            Nothing open
          </AppText>
        ) : null}
        {open.map(({ severity, count }) => (
          <SeverityCount key={severity} jobId={jobId} levelId={id} place={row.name} severity={severity} count={count} />
        ))}
        {row.fixSubmitted > 0 ? (
          <Link href={links.findings(jobId, { levelId: id, status: 'fix_submitted' })} asChild>
            <Pressable
              accessibilityRole="link"
              accessibilityLabel={`${row.fixSubmitted} fix${row.fixSubmitted === 1 ? '' : 'es'} waiting for re-inspection on ${row.name}. Show them.`}
              testID={`floor-${id}-waiting`}
              style={styles.count}
            >
              <AppText variant="label" style={styles.linkText}>
                {row.fixSubmitted} fix{row.fixSubmitted === 1 ? '' : 'es'} waiting
              </AppText>
            </Pressable>
          </Link>
        ) : null}
      </View>
      {notes.length > 0 ? (
        <View style={styles.systems} testID={`floor-${id}-systems`}>
          {notes.map((n) => (
            <Link key={`${n.systemId}-${n.kind}`} href={links.readiness(jobId, n.systemId)} testID={`floor-${id}-system-${n.systemId}-${n.kind}`}>
              <AppText variant="small" style={n.kind === 'refrigerant' ? styles.alarm : styles.waitingText}>
                {n.kind === 'refrigerant' ? '⚠ ' : '○ '}
                {n.words}
              </AppText>
            </Link>
          ))}
        </View>
      ) : null}
    </View>
  );
}

function SeverityCount({ jobId, levelId, place, severity, count }: { jobId: string; levelId: string; place: string; severity: Severity; count: number }) {
  return (
    <Link href={links.findings(jobId, { levelId, status: 'open', severity })} asChild>
      <Pressable
        accessibilityRole="link"
        accessibilityLabel={`${count} ${severity} open on ${place}. Show these findings.`}
        testID={`floor-${levelId}-${severity}`}
        style={styles.count}
      >
        <SeverityShape severity={severity} size={12} />
        <AppText variant="label" style={severity === 'critical' ? styles.alarm : styles.linkText}>
          {count} {severity}
        </AppText>
      </Pressable>
    </Link>
  );
}

const styles = StyleSheet.create({
  building: { gap: 0 },
  // The roof: a slab a little narrower than the floors, drawn, not labelled (a level may be called "Roof").
  roof: {
    alignSelf: 'center',
    width: '94%',
    height: 14,
    backgroundColor: colors.spruce,
    borderTopLeftRadius: radius.lg,
    borderTopRightRadius: radius.lg,
  },
  floor: {
    backgroundColor: colors.surface,
    borderWidth: 1,
    borderColor: colors.line,
    borderTopWidth: 0,
    borderLeftWidth: 8,
    paddingHorizontal: space.md,
    paddingVertical: space.sm,
    gap: space.xs,
  },
  top: { flexDirection: 'row', justifyContent: 'space-between', alignItems: 'center', flexWrap: 'wrap', gap: space.sm },
  topWide: { flexDirection: 'row', justifyContent: 'space-between', alignItems: 'center', gap: space.lg },
  name: { color: colors.spruce },
  readiness: {},
  coverage: { flexDirection: 'row', alignItems: 'center', gap: space.sm, flexWrap: 'wrap', maxWidth: 560 },
  bar: { flexGrow: 1, minWidth: 160 },
  counts: { flexDirection: 'row', flexWrap: 'wrap', gap: space.md, alignItems: 'center' },
  count: { flexDirection: 'row', alignItems: 'center', gap: space.xs, minHeight: 32 },
  linkText: { color: colors.spruce, textDecorationLine: 'underline' },
  alarm: { color: colors.danger, textDecorationLine: 'underline' },
  waitingText: { color: colors.ink, textDecorationLine: 'underline' },
  systems: { gap: 2 },
  ground: { height: 8, backgroundColor: colors.inkMuted, borderBottomLeftRadius: radius.sm, borderBottomRightRadius: radius.sm },
});
