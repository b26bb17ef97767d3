import { Link, type Href } from 'expo-router';
import { Pressable, StyleSheet, View } from 'react-native';
import type { BoardCounts } from '../../shared/schemas/board';
import type { Role } from '../../shared/words';
import { colors, linkTarget, radius, space } from '../theme';
import { AppText } from '../ui/AppText';
import { Badge } from '../ui/Badge';
import { Tabs, type TabItem } from '../ui/Tabs';
import { SeverityShape } from '../walk/SeverityMark';
import { links } from '../links';
import { COUNT_LABELS, boardCellFilters, coverage, overdueShare, percent, type BoardCountKey } from './counts';

/** Who sees company scorecards (the server answers 403 to anyone else). */
export function maySeeScorecards(role: Role | undefined): boolean {
  return role === 'gc_manager' || role === 'inspector';
}

/** The GC's view in three sections, as tabs at the top of each. */
export function BoardTabs({ jobId, role, current }: { jobId: string; role: Role | undefined; current: 'board' | 'readiness' | 'scorecards' }) {
  const items: TabItem[] = [
    { key: 'board', label: 'Levels board', href: links.board(jobId) },
    { key: 'readiness', label: 'Readiness', href: links.readiness(jobId) },
  ];
  if (maySeeScorecards(role)) items.push({ key: 'scorecards', label: 'Company scorecards', href: links.scorecards(jobId) });
  return <Tabs items={items} current={current} testID="board-tabs" />;
}

/** A back link at the top of a screen. */
export function BackLink({ href, label, testID }: { href: Href; label: string; testID?: string }) {
  return (
    <Link href={href} style={styles.back} testID={testID}>
      <AppText variant="label" style={{ color: colors.spruce }}>
        ← {label}
      </AppText>
    </Link>
  );
}

/**
 * One count of the board as a link to the findings behind it, already filtered. The label says
 * what the number counts and where (read by screen readers in place of the bare number).
 */
export function CountLink({
  jobId,
  levelId,
  countKey,
  value,
  place,
  testID,
  big,
  word,
}: {
  jobId: string;
  levelId?: string;
  countKey: BoardCountKey;
  /** A word after the number where no column or tile title names it ("3 major"). */
  word?: string;
  value: number;
  /** "Level 3" or "all levels", for the link's label. */
  place: string;
  testID: string;
  big?: boolean;
}) {
  const alarm = value > 0 && (countKey === 'openCritical' || countKey === 'overdue');
  return (
    <Link href={links.findings(jobId, boardCellFilters(countKey, levelId))} asChild>
      <Pressable
        accessibilityRole="link"
        // The name starts with what the link shows (speech and switch users say what they see).
        accessibilityLabel={`${value}${word ? ` ${word}` : ''} — ${COUNT_LABELS[countKey]} on ${place}. Show these findings.`}
        testID={testID}
        style={StyleSheet.flatten([styles.count, big ? styles.countBig : null, alarm ? styles.alarm : null])}
      >
        {countKey === 'openCritical' || countKey === 'openMajor' ? (
          <SeverityShape severity={countKey === 'openCritical' ? 'critical' : 'major'} size={12} />
        ) : null}
        <AppText
          variant={big ? 'title' : 'heading'}
          style={{ color: value === 0 ? colors.inkFaint : alarm ? colors.danger : colors.spruce, textDecorationLine: value === 0 ? 'none' : 'underline' }}
        >
          {value}
          {word ? ` ${word}` : null}
        </AppText>
      </Pressable>
    </Link>
  );
}

/**
 * Overdue as a share of the open findings, shown under Open ("2 of 5 overdue"), linked to the
 * overdue findings. Nothing when nothing is open: then nothing can be overdue.
 */
export function OverdueShare({
  jobId,
  levelId,
  open,
  overdue,
  place,
  testID,
  big,
}: {
  jobId: string;
  levelId?: string;
  open: number;
  overdue: number;
  place: string;
  testID: string;
  /** As large as the counts beside it (the phone's "of the open" line), not a caption under a count. */
  big?: boolean;
}) {
  if (open === 0) return null;
  const share = overdueShare({ open, overdue }, place);
  const alarm = overdue > 0;
  return (
    <Link href={links.findings(jobId, boardCellFilters('overdue', levelId))} asChild>
      <Pressable accessibilityRole="link" accessibilityLabel={share.label} testID={testID} style={StyleSheet.flatten([styles.share, alarm ? styles.alarm : null])}>
        <AppText variant={big ? 'heading' : 'small'} style={{ color: alarm ? colors.danger : colors.inkMuted, textDecorationLine: 'underline' }}>
          {share.text}
        </AppText>
      </Pressable>
    </Link>
  );
}

/** The statuses that partition the total, then the total they add up to. */
const STATUS_TILES: BoardCountKey[] = ['open', 'fixSubmitted', 'closed', 'total'];

/**
 * A level's (or the job's) counts as tiles: open, fix submitted and closed, and the total they add
 * up to; under them the parts of the open findings: how many are overdue ("2 of 5 overdue"),
 * critical and major. The phone's board cards and the level page show the same.
 */
export function StatusTiles({
  jobId,
  levelId,
  row,
  place,
  cellTestID,
  ofOpenTestID,
}: {
  jobId: string;
  levelId?: string;
  row: Pick<BoardCounts, BoardCountKey>;
  place: string;
  cellTestID: (key: BoardCountKey) => string;
  ofOpenTestID: string;
}) {
  return (
    <>
      <View style={styles.tiles}>
        {STATUS_TILES.map((k) => (
          <View key={k} style={[styles.tile, k === 'total' ? styles.totalTile : null]}>
            <AppText variant="small" muted style={styles.tileLabel}>
              {k === 'total' ? '= Total' : COUNT_LABELS[k]}
            </AppText>
            <CountLink jobId={jobId} levelId={levelId} countKey={k} value={row[k]} place={place} testID={cellTestID(k)} big />
          </View>
        ))}
      </View>
      {row.open > 0 ? (
        <View style={styles.ofOpen} testID={ofOpenTestID}>
          <AppText variant="small" muted style={styles.tileLabel}>
            Of the {row.open} open:
          </AppText>
          <OverdueShare jobId={jobId} levelId={levelId} open={row.open} overdue={row.overdue} place={place} testID={cellTestID('overdue')} big />
          <View style={styles.ofOpenRow}>
            <CountLink jobId={jobId} levelId={levelId} countKey="openCritical" value={row.openCritical} place={place} testID={cellTestID('openCritical')} word="critical" />
            <CountLink jobId={jobId} levelId={levelId} countKey="openMajor" value={row.openMajor} place={place} testID={cellTestID('openMajor')} word="major" />
          </View>
        </View>
      ) : null}
    </>
  );
}

/** Units checked of units, with a small bar (the words carry the number; the bar only supports it). */
export function CoverageBar({ checked, total, testID }: { checked: number; total: number; testID?: string }) {
  const c = coverage({ unitsChecked: checked, unitsTotal: total });
  const full = total > 0 && checked >= total;
  return (
    <View style={styles.coverage} testID={testID} accessibilityLabel={`${c.text} units checked (${percent(c.share)})`}>
      <AppText variant="small">
        {c.text}
        <AppText variant="small" muted>
          {' '}
          · {percent(c.share)}
        </AppText>
      </AppText>
      <View style={styles.track} aria-hidden>
        <View style={[styles.fill, { width: `${Math.min(100, c.share * 100)}%`, backgroundColor: full ? colors.good : colors.spruce }]} />
      </View>
    </View>
  );
}

/** Ready to close ceilings, or how many findings block it. */
export function CeilingBadge({ ready, blockers, testID, short }: { ready: boolean; blockers: number; testID?: string; short?: boolean }) {
  return ready ? (
    <Badge label={short ? '✓ Can close' : '✓ Ceilings can close'} tone="good" testID={testID} />
  ) : (
    <Badge label={`✕ ${blockers} blocking`} tone="bad" testID={testID} />
  );
}

/** Ready for startup, or not yet. */
export function StartupBadge({ ready, testID }: { ready: boolean; testID?: string }) {
  return ready ? <Badge label="✓ Ready for startup" tone="good" testID={testID} /> : <Badge label="✕ Not ready" tone="bad" testID={testID} />;
}

const styles = StyleSheet.create({
  back: linkTarget,
  count: {
    flexDirection: 'row',
    alignItems: 'center',
    gap: space.xs,
    alignSelf: 'flex-start',
    minHeight: 36,
    minWidth: 44,
    paddingHorizontal: space.sm,
    borderRadius: radius.sm,
  },
  countBig: { minHeight: 44 },
  share: { alignSelf: 'flex-start', justifyContent: 'center', minHeight: 36, paddingHorizontal: space.sm, borderRadius: radius.sm },
  alarm: { backgroundColor: colors.dangerSoft },
  tiles: { flexDirection: 'row', flexWrap: 'wrap', rowGap: space.xs },
  // Equal heights in a row; the number at the foot, so a label on two lines does not push one number down.
  tile: { width: '25%', gap: 2, justifyContent: 'space-between' },
  totalTile: { borderLeftWidth: 1, borderLeftColor: colors.line },
  tileLabel: { paddingLeft: space.sm },
  ofOpen: { gap: 2 },
  ofOpenRow: { flexDirection: 'row', flexWrap: 'wrap', alignItems: 'center', gap: space.xs },
  coverage: { gap: 4, minWidth: 0 },
  track: { height: 6, borderRadius: 3, backgroundColor: colors.line, overflow: 'hidden' },
  fill: { height: 6, borderRadius: 3 },
});
