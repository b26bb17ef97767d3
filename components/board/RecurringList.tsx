import { Link } from 'expo-router';
import { StyleSheet, View } from 'react-native';
import type { RecurringDefect, RecurringResponse } from '../../shared/schemas/board';
import { colors, radius, space } from '../theme';
import { AppText } from '../ui/AppText';
import { Card } from '../ui/Card';
import { Table, type Column } from '../ui/Table';
import { links } from '../links';
import { percent } from './counts';

/**
 * Defect types found on many units of the job (a crew habit to correct before the next floor):
 * code and title, units and share of the checked units, and where (levels) and who (companies, and
 * within each company the crew that installed the units).
 */
export function RecurringList({ jobId, data, wide }: { jobId: string; data: RecurringResponse; wide: boolean }) {
  const t = data.thresholds;
  return (
    <View style={styles.wrap} testID="recurring">
      <View style={styles.head}>
        <AppText variant="title" role="heading">
          Recurring defects
        </AppText>
        <AppText variant="small" muted>
          A defect type counts as recurring on this job when found on at least {t.minUnits} units and at least {percent(t.minShare)} of the checked
          units it applies to.
        </AppText>
      </View>
      {data.items.length === 0 ? (
        <AppText muted testID="recurring-empty">
          No recurring defects: no defect type has reached the job&apos;s thresholds.
        </AppText>
      ) : wide ? (
        <Table columns={columns(jobId)} rows={data.items} rowKey={(r) => r.key} rowTestID={(r) => `recurring-${r.code}`} testID="recurring-table" />
      ) : (
        data.items.map((r) => (
          <Card key={r.key} testID={`recurring-${r.code}`}>
            <View style={styles.top}>
              <AppText variant="small" muted>
                {r.code}
              </AppText>
              <Link href={links.findings(jobId, recurringFilters(r))} testID={`recurring-link-${r.code}`}>
                <AppText variant="heading" style={styles.link}>
                  {r.title}
                </AppText>
              </Link>
            </View>
            <AppText variant="small" muted>
              <AppText variant="heading" testID={`recurring-share-${r.code}`}>
                {percent(r.share)}
              </AppText>{' '}
              {unitsText(r)}
            </AppText>
            <View style={styles.bar} aria-hidden>
              <View style={[styles.fill, { width: `${Math.min(100, r.share * 100)}%` }]} />
            </View>
            <Breakdown label="Units by level" items={r.byLevel.map((l) => ({ key: l.levelId, name: l.name, count: l.count }))} />
            <Breakdown label="Units by company" items={r.byCompany.map((c) => ({ key: c.companyId, name: c.name, count: c.count }))} />
            <Breakdown label="Units by crew" items={crewPills(r)} testID={`recurring-crews-${r.code}`} />
          </Card>
        ))
      )}
    </View>
  );
}

/** "on 6 of 30 looked-at units of its kinds" (checked, or the type was found on them). */
/** The findings of one recurring defect: its type, and for "Something else" (one type, many defects) its title too. */
function recurringFilters(r: RecurringDefect) {
  return r.key === r.catalogueItemId ? { catalogueItemId: r.catalogueItemId } : { catalogueItemId: r.catalogueItemId, q: r.title };
}

function unitsText(r: RecurringDefect): string {
  return `on ${r.unitCount} of ${r.checkedUnits} looked-at unit${r.checkedUnits === 1 ? '' : 's'} of its kinds`;
}

/**
 * Each company's units by the crew (of that company) that installed them: a habit belongs to a
 * crew. Units whose crew is not recorded are counted too, so a company's crews add up to its count.
 */
function crewPills(r: RecurringDefect): { key: string; name: string; count: number }[] {
  // The company is named only when the crews are of more than one: on a phone every word counts.
  const companies = new Set(r.byCrew.map((c) => c.companyId)).size;
  return r.byCrew.map((c) => {
    const crew = c.name ?? (companies > 1 ? 'crew not recorded' : 'Crew not recorded');
    return { key: `${c.companyId}|${c.crewId ?? ''}`, name: companies > 1 ? `${c.companyName} · ${crew}` : crew, count: c.count };
  });
}

function Pills({ items, testID }: { items: { key: string; name: string; count: number }[]; testID?: string }) {
  return (
    <View style={styles.pills} testID={testID}>
      {items.map((i) => (
        <View key={i.key} style={styles.pill}>
          <AppText variant="small">
            {i.name} <AppText variant="label">{i.count}</AppText>
          </AppText>
        </View>
      ))}
    </View>
  );
}

function columns(jobId: string): Column<RecurringDefect>[] {
  return [
    {
      key: 'defect',
      title: 'Defect type',
      flex: 2.4,
      render: (r) => (
        <Link href={links.findings(jobId, recurringFilters(r))} testID={`recurring-link-${r.code}`}>
          <AppText variant="label" style={styles.link}>
            <AppText variant="small" muted>
              {r.code}
            </AppText>{' '}
            {r.title}
          </AppText>
        </Link>
      ),
    },
    { key: 'units', title: 'Units', flex: 0.7, render: (r) => <AppText variant="heading">{r.unitCount}</AppText> },
    {
      key: 'share',
      title: 'Share of looked-at',
      flex: 1.2,
      render: (r) => (
        <View style={styles.shareCell} testID={`recurring-share-${r.code}`}>
          <AppText variant="label">
            {percent(r.share)}{' '}
            <AppText variant="small" muted>
              of {r.checkedUnits}
            </AppText>
          </AppText>
          <View style={styles.bar} aria-hidden>
            <View style={[styles.fill, { width: `${Math.min(100, r.share * 100)}%` }]} />
          </View>
        </View>
      ),
    },
    { key: 'levels', title: 'Units by level', flex: 2.2, render: (r) => <Pills items={r.byLevel.map((l) => ({ key: l.levelId, name: l.name, count: l.count }))} /> },
    { key: 'companies', title: 'Units by company', flex: 2, render: (r) => <Pills items={r.byCompany.map((c) => ({ key: c.companyId, name: c.name, count: c.count }))} /> },
    { key: 'crews', title: 'Units by crew', flex: 2.2, render: (r) => <Pills items={crewPills(r)} testID={`recurring-crews-${r.code}`} /> },
  ];
}

function Breakdown({ label, items, testID }: { label: string; items: { key: string; name: string; count: number }[]; testID?: string }) {
  if (items.length === 0) return null;
  return (
    <View style={styles.breakdown}>
      <AppText variant="label">{label}</AppText>
      <Pills items={items} testID={testID} />
    </View>
  );
}

const styles = StyleSheet.create({
  wrap: { gap: space.md },
  head: { gap: space.xs },
  top: { gap: 2 },
  link: { color: colors.spruce, textDecorationLine: 'underline' },
  bar: { height: 6, borderRadius: 3, backgroundColor: colors.line, overflow: 'hidden' },
  fill: { height: 6, backgroundColor: colors.ochre },
  shareCell: { gap: 4 },
  breakdown: { flexDirection: 'row', alignItems: 'center', gap: space.sm, flexWrap: 'wrap' },
  // Shrinks to the card and wraps: a long crew name never pushes the page sideways.
  pills: { flexDirection: 'row', flexWrap: 'wrap', gap: space.xs, flexShrink: 1, minWidth: 0, maxWidth: '100%' },
  pill: { borderRadius: radius.sm, backgroundColor: colors.paper, borderWidth: 1, borderColor: colors.line, paddingHorizontal: space.sm, paddingVertical: 2 },
});
