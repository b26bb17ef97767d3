import { Link, useRouter } from 'expo-router';
import type { ReactNode } from 'react';
import { Pressable, StyleSheet, View } from 'react-native';
import { defectCodeWords } from '../../shared/rules/somethingElse';
import type { FindingDto, FindingSort } from '../../shared/schemas/findings';
import { colors, radius, space, touchTarget } from '../theme';
import { AppText } from '../ui/AppText';
import { SeverityMark } from '../walk/SeverityMark';
import { formatDay } from './due';
import { StatusBadge, findingPlace } from './FindingCard';
import { links } from '../links';

type SortKey = 'number' | 'dueOn' | 'loggedAt' | 'severity';

interface Col {
  key: string;
  title: string;
  flex: number;
  sort?: SortKey;
  render: (f: FindingDto) => ReactNode;
}

const COLUMNS: Col[] = [
  { key: 'number', title: 'No.', flex: 0.6, sort: 'number', render: (f) => <AppText variant="label">{f.label}</AppText> },
  {
    key: 'defect',
    title: 'Defect',
    flex: 2.4,
    render: (f) => (
      <View>
        <AppText variant="small" muted>
          {defectCodeWords(f.code)}
        </AppText>
        <AppText numberOfLines={2}>{f.title}</AppText>
      </View>
    ),
  },
  { key: 'where', title: 'Where', flex: 1.8, render: (f) => <AppText variant="small">{findingPlace(f)}</AppText> },
  { key: 'severity', title: 'Severity', flex: 1.1, sort: 'severity', render: (f) => <SeverityMark severity={f.severity} /> },
  { key: 'status', title: 'Status', flex: 1.2, render: (f) => <StatusBadge status={f.status} /> },
  { key: 'company', title: 'Company', flex: 1.4, render: (f) => <AppText variant="small">{f.companyName}</AppText> },
  {
    key: 'due',
    title: 'Due',
    flex: 1.2,
    sort: 'dueOn',
    render: (f) => (
      <AppText variant="small" style={f.overdue ? styles.overdue : null}>
        {f.overdue ? '⚠ ' : ''}
        {formatDay(f.dueOn)}
      </AppText>
    ),
  },
  { key: 'measured', title: 'Measured', flex: 1, render: (f) => <AppText variant="small">{f.measuredText ?? '—'}</AppText> },
];

/** Row selection for bulk changes (GC managers and inspectors). */
export interface TableSelection {
  selected: ReadonlySet<string>;
  onToggle: (findingId: string) => void;
  /** Select every row shown, or clear when all are selected. */
  onToggleAll: () => void;
}

function Check({ on, label, onPress, testID }: { on: boolean; label: string; onPress: () => void; testID: string }) {
  return (
    <Pressable role="checkbox" aria-checked={on} accessibilityState={{ checked: on }} accessibilityLabel={label} onPress={onPress} style={styles.check} testID={testID}>
      <View style={[styles.box, on ? styles.boxOn : null]}>{on ? <AppText style={styles.tick}>✓</AppText> : null}</View>
    </Pressable>
  );
}

/**
 * The findings as a table on a wide screen; the sortable column headers toggle ascending /
 * descending. With `selection`, a checkbox column picks rows for a bulk change.
 */
export function FindingsTable({
  jobId,
  rows,
  sort,
  onSort,
  selection,
}: {
  jobId: string;
  rows: readonly FindingDto[];
  sort: FindingSort;
  onSort: (s: FindingSort) => void;
  selection?: TableSelection;
}) {
  const router = useRouter();
  const allOn = selection !== undefined && rows.length > 0 && rows.every((r) => selection.selected.has(r.id));
  const current = sort.replace(/^-/, '') as SortKey;
  const desc = sort.startsWith('-');
  return (
    <View style={styles.table} role="table" testID="findings-table">
      <View style={[styles.row, styles.head]} role="row">
        {selection ? (
          <View style={styles.checkCell} role="columnheader">
            <Check on={allOn} label={allOn ? 'Clear the selection' : 'Select every finding shown'} onPress={selection.onToggleAll} testID="findings-select-all" />
          </View>
        ) : null}
        {COLUMNS.map((c) => {
          const on = c.sort === current;
          const arrow = on ? (desc ? ' ▼' : ' ▲') : '';
          return (
            <View key={c.key} style={[styles.cell, { flex: c.flex }]} role="columnheader" aria-sort={on ? (desc ? 'descending' : 'ascending') : undefined}>
              {c.sort ? (
                <Pressable
                  accessibilityRole="button"
                  accessibilityLabel={`Sort by ${c.title}`}
                  testID={`findings-sort-${c.sort}`}
                  style={styles.sortButton}
                  onPress={() => onSort((on && !desc ? `-${c.sort}` : c.sort) as FindingSort)}
                >
                  <AppText variant="label" style={{ color: on ? colors.spruce : colors.inkMuted }}>
                    {c.title}
                    {arrow}
                  </AppText>
                </Pressable>
              ) : (
                <AppText variant="label" muted>
                  {c.title}
                </AppText>
              )}
            </View>
          );
        })}
      </View>
      {rows.map((f, i) => {
        const on = selection?.selected.has(f.id) ?? false;
        const href = links.finding(jobId, f.id);
        // A real table row (row > cells): the finding's number is its link (keyboard and screen
        // readers); a click anywhere else on the row opens it too. The checkbox is a cell of its own,
        // so ticking never opens the finding.
        return (
          <Pressable
            key={f.id}
            role="row"
            focusable={false}
            onPress={() => router.push(href)}
            style={StyleSheet.flatten([styles.row, i % 2 === 1 ? styles.zebra : null, on ? styles.picked : null])}
            testID={`finding-row-${f.number}`}
          >
            {selection ? (
              <View style={styles.checkCell} role="cell">
                <Check on={on} label={`Select ${f.label}`} onPress={() => selection.onToggle(f.id)} testID={`finding-select-${f.number}`} />
              </View>
            ) : null}
            {COLUMNS.map((c) => (
              <View key={c.key} style={[styles.cell, { flex: c.flex }]} role="cell">
                {c.key === 'number' ? (
                  // The row's own press would open it a second time: the link's press stops here.
                  <Link href={href} onPress={(e) => e.stopPropagation()} testID={`finding-open-${f.number}`} style={styles.numberLink}>
                    <AppText variant="label" style={styles.numberText}>
                      {f.label}
                    </AppText>
                  </Link>
                ) : (
                  c.render(f)
                )}
              </View>
            ))}
          </Pressable>
        );
      })}
    </View>
  );
}

const styles = StyleSheet.create({
  table: { borderWidth: 1, borderColor: colors.line, borderRadius: radius.md, backgroundColor: colors.surface, overflow: 'hidden' },
  row: { flexDirection: 'row', borderBottomWidth: 1, borderBottomColor: colors.line, alignItems: 'center', minHeight: touchTarget },
  head: { backgroundColor: colors.paper },
  zebra: { backgroundColor: '#FAF8F3' },
  cell: { paddingHorizontal: space.sm, paddingVertical: space.sm, minWidth: 0 },
  sortButton: { minHeight: touchTarget, justifyContent: 'center' },
  overdue: { color: colors.danger, fontWeight: '700' },
  numberLink: { minHeight: touchTarget, display: 'flex', alignItems: 'center' },
  numberText: { color: colors.spruce, textDecorationLine: 'underline' },
  picked: { backgroundColor: colors.spruceSoft },
  checkCell: { width: 52, alignItems: 'center', justifyContent: 'center' },
  check: { minWidth: touchTarget, minHeight: touchTarget, alignItems: 'center', justifyContent: 'center' },
  box: { width: 22, height: 22, borderRadius: 4, borderWidth: 2, borderColor: colors.spruce, backgroundColor: colors.surface, alignItems: 'center', justifyContent: 'center' },
  boxOn: { backgroundColor: colors.spruce },
  tick: { color: colors.paper, fontWeight: '700', lineHeight: 18 },
});
