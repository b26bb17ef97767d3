import { Link, type Href } from 'expo-router';
import type { ReactNode } from 'react';
import { Pressable, StyleSheet, View } from 'react-native';
import type { CompanyScorecard } from '../../shared/schemas/board';
import { TRADES } from '../../shared/words';
import { ApiError } from '../api/client';
import { ExportLink } from '../exports/ExportLink';
import { CompanyReports } from '../reports/CompanyReports';
import { exportUrls } from '../api/exports';
import { useScorecardsQuery } from '../queries/board';
import { useJobQuery } from '../queries/jobs';
import { colors, fonts, radius, space } from '../theme';
import { AppText } from '../ui/AppText';
import { Card } from '../ui/Card';
import { Notice } from '../ui/Notice';
import { Screen } from '../ui/Screen';
import { EmptyState, ErrorState, LoadingState } from '../ui/States';
import { useWide } from '../ui/useWide';
import { links } from '../links';
import { percent } from './counts';
import { BackLink, BoardTabs, maySeeScorecards } from './parts';
import { nextSort, sortScorecards, type ScorecardKey, type ScorecardSort } from './scorecardSort';

/** The company's trades on the job as labels ("mechanical" → "Mechanical"). */
function tradeLabel(c: Pick<CompanyScorecard, 'trade' | 'trades'>): string | null {
  const keys = c.trades?.length ? c.trades : c.trade ? [c.trade] : [];
  return keys.length ? keys.map((k) => TRADES.find((t) => t.key === k)?.label ?? k).join(', ') : null;
}

function days(v: number | null): string {
  if (v === null) return '—';
  const r = Math.round(v * 10) / 10;
  return `${r} day${r === 1 ? '' : 's'}`;
}
function rate(c: CompanyScorecard): string {
  return c.firstPassRate === null ? '—' : `${percent(c.firstPassRate)} (${c.acceptedFirstPass} of ${c.accepted})`;
}

interface Col {
  key: ScorecardKey;
  title: string;
  flex: number;
  render: (c: CompanyScorecard, jobId: string) => ReactNode;
}

const COLS: Col[] = [
  {
    key: 'name',
    title: 'Company',
    flex: 2,
    render: (c) => (
      <View>
        <AppText variant="heading" testID="scorecard-name">
          {c.name}
        </AppText>
        {tradeLabel(c) ? (
          <AppText variant="small" muted>
            {tradeLabel(c)}
          </AppText>
        ) : null}
      </View>
    ),
  },
  { key: 'open', title: 'Open', flex: 0.8, render: (c) => String(c.open) },
  { key: 'overdue', title: 'Overdue, of open', flex: 1, render: (c) => overdueShare(c) },
  { key: 'fixesWaiting', title: 'Fixes waiting', flex: 1, render: (c) => fixesWaitingText(c) },
  { key: 'medianDaysToAccept', title: 'Median days to accepted fix', flex: 1.4, render: (c) => days(c.medianDaysToAccept) },
  { key: 'firstPassRate', title: 'First-pass acceptance', flex: 1.5, render: (c) => rate(c) },
  { key: 'returns', title: 'Returns', flex: 0.8, render: (c) => String(c.returns) },
];

/** What each figure measures, in one line each, shown under the title (the same order as the columns). */
export const SCORECARD_MEANINGS: readonly { key: ScorecardKey; label: string; line: string }[] = [
  { key: 'open', label: 'Open', line: 'findings assigned to the company that still need their work (new or returned).' },
  { key: 'overdue', label: 'Overdue, of open', line: 'how many of the open findings are past their due date; a fix waiting for re-inspection is not counted.' },
  { key: 'fixesWaiting', label: 'Fixes waiting', line: 'fixes the company submitted that wait for an inspector, and how long the oldest has waited (days on the job’s clock).' },
  { key: 'medianDaysToAccept', label: 'Median days to accepted fix', line: 'the middle value of the days from assignment to the company until its fix was accepted.' },
  { key: 'firstPassRate', label: 'First-pass acceptance', line: 'of the fixes accepted, the share accepted at their first re-inspection.' },
  { key: 'returns', label: 'Returns', line: 'fixes an inspector sent back while the finding was the company’s.' },
];

/**
 * Per company: open, overdue, fixes waiting, time to an accepted fix, first-pass acceptance and
 * returns. The order comes from the route (it lives in the address: links.scorecards).
 */
export function ScorecardsScreen({ jobId, sort, onSortChange }: { jobId: string; sort: ScorecardSort; onSortChange: (next: ScorecardSort) => void }) {
  const wide = useWide();
  const job = useJobQuery(jobId);
  const role = job.data?.role;
  const allowed = role === undefined ? false : maySeeScorecards(role);
  const cards = useScorecardsQuery(jobId, allowed);
  const forbidden = (job.data && !allowed) || (cards.error instanceof ApiError && cards.error.status === 403);

  return (
    <Screen testID="scorecards-screen" maxWidth={wide ? 1200 : 720}>
      <BackLink href={links.job(jobId)} label={job.data?.name ?? 'The job'} testID="scorecards-back" />
      <View style={styles.head}>
        <AppText variant="display" role="heading">
          Company scorecards
        </AppText>
        <AppText muted>Who is holding the job up, company by company.</AppText>
        <View style={styles.meanings} testID="scorecards-meanings">
          {SCORECARD_MEANINGS.map((m) => (
            <AppText key={m.key} variant="small" muted testID={`scorecards-meaning-${m.key}`}>
              <AppText variant="small" style={styles.meaningLabel}>
                {m.label}:
              </AppText>{' '}
              {m.line}
            </AppText>
          ))}
        </View>
      </View>
      <BoardTabs jobId={jobId} role={role} current="scorecards" />
      {forbidden ? (
        <Notice tone="info" title="For the GC manager and inspectors" testID="scorecards-forbidden">
          Company scorecards compare every company on the job, so only the GC manager and inspectors see them.
        </Notice>
      ) : job.isPending || cards.isPending ? (
        <LoadingState label="Loading the scorecards…" />
      ) : job.isError ? (
        <ErrorState message={job.error.message} onRetry={() => job.refetch()} />
      ) : cards.isError ? (
        <ErrorState message={cards.error.message} onRetry={() => cards.refetch()} />
      ) : cards.data.companies.length === 0 ? (
        <EmptyState title="No companies yet" body="Companies appear here once findings are assigned to them." testID="scorecards-empty" />
      ) : wide ? (
        <ScorecardsTable jobId={jobId} rows={sortScorecards(cards.data.companies, sort)} sort={sort} onSort={(k) => onSortChange(nextSort(sort, k))} />
      ) : (
        <ScorecardCards jobId={jobId} rows={sortScorecards(cards.data.companies, sort)} />
      )}
      {allowed && cards.data && cards.data.companies.length > 0 ? (
        <ExportLink href={exportUrls.scorecardsCsv(jobId)} label="Export scorecards as CSV" testID="scorecards-export" />
      ) : null}
      {allowed && cards.data ? <CompanyReports jobId={jobId} companies={cards.data.companies} /> : null}
    </Screen>
  );
}

/** The wide table: each header sorts by its column (again: the other way round). */
export function ScorecardsTable({
  jobId,
  rows,
  sort,
  onSort,
}: {
  jobId: string;
  rows: readonly CompanyScorecard[];
  sort: ScorecardSort;
  onSort: (key: ScorecardKey) => void;
}) {
  return (
    <View style={styles.table} role="table" testID="scorecards-table" aria-label="Company scorecards">
      <View style={[styles.row, styles.headRow]} role="row">
        {COLS.map((c) => {
          const on = sort.key === c.key;
          const arrow = on ? (sort.dir === 'desc' ? ' ▼' : ' ▲') : '';
          return (
            <View
              key={c.key}
              style={[styles.cell, { flex: c.flex }]}
              role="columnheader"
              aria-sort={on ? (sort.dir === 'desc' ? 'descending' : 'ascending') : 'none'}
              testID={`scorecards-col-${c.key}`}
            >
              <Pressable accessibilityRole="button" accessibilityLabel={`Sort by ${c.title}`} testID={`scorecards-sort-${c.key}`} onPress={() => onSort(c.key)} style={styles.sortButton}>
                <AppText variant="label" style={{ color: on ? colors.spruce : colors.inkMuted }}>
                  {c.title}
                  {arrow}
                </AppText>
              </Pressable>
            </View>
          );
        })}
      </View>
      {rows.map((r, i) => (
        <View key={r.companyId} style={[styles.row, i % 2 === 1 ? styles.zebra : null]} role="row" testID={`scorecards-row-${i}`}>
          {COLS.map((c) => {
            const content = c.key === 'open' || c.key === 'overdue' ? <CompanyCount jobId={jobId} row={r} which={c.key} /> : c.render(r, jobId);
            return (
              <View key={c.key} style={[styles.cell, { flex: c.flex }]} role="cell">
                {typeof content === 'string' ? <AppText>{content}</AppText> : content}
              </View>
            );
          })}
        </View>
      ))}
    </View>
  );
}

/** Overdue is a share of the open findings, never a status beside them: "5 of 50". */
export function overdueShare(row: Pick<CompanyScorecard, 'overdue' | 'open'>): string {
  return `${row.overdue} of ${row.open}`;
}

/** Open and overdue open the company's findings. */
function CompanyCount({ jobId, row, which }: { jobId: string; row: CompanyScorecard; which: 'open' | 'overdue' }) {
  const href = links.findings(jobId, which === 'open' ? { companyId: row.companyId, status: 'open' } : { companyId: row.companyId, overdue: true });
  if (which === 'open') return <LinkText href={href} label={`${row.open}`} a11y={`Open findings of ${row.name}: ${row.open}`} />;
  return <LinkText href={href} label={overdueShare(row)} a11y={`Overdue findings of ${row.name}: ${row.overdue} of ${row.open} open`} />;
}

function LinkText({ href, label, a11y }: { href: Href; label: string; a11y: string }) {
  return (
    <Link href={href} accessibilityLabel={a11y}>
      <AppText variant="heading" style={styles.link}>
        {label}
      </AppText>
    </Link>
  );
}

/** Phone: one card per company, in the same order. */
function ScorecardCards({ jobId, rows }: { jobId: string; rows: readonly CompanyScorecard[] }) {
  return (
    <View style={styles.cards} testID="scorecards-cards">
      {rows.map((r, i) => (
        <Card key={r.companyId} testID={`scorecards-card-${i}`}>
          <AppText variant="title" testID="scorecard-name">
            {r.name}
          </AppText>
          {tradeLabel(r) ? (
            <AppText variant="small" muted>
              {tradeLabel(r)}
            </AppText>
          ) : null}
          <View style={styles.facts}>
            <Fact label="Open">
              <CompanyCount jobId={jobId} row={r} which="open" />
            </Fact>
            <Fact label="Overdue, of open">
              <CompanyCount jobId={jobId} row={r} which="overdue" />
            </Fact>
            <Fact label="Fixes waiting">{fixesWaitingText(r)}</Fact>
            <Fact label="Returns">{String(r.returns)}</Fact>
            <Fact label="Median days to accepted fix">{days(r.medianDaysToAccept)}</Fact>
            <Fact label="First-pass acceptance">{rate(r)}</Fact>
          </View>
        </Card>
      ))}
    </View>
  );
}

function Fact({ label, children }: { label: string; children: ReactNode }) {
  return (
    <View style={styles.fact}>
      <AppText variant="small" muted>
        {label}
      </AppText>
      {typeof children === 'string' ? <AppText variant="heading">{children}</AppText> : children}
    </View>
  );
}

const styles = StyleSheet.create({
  meanings: { gap: 2 },
  meaningLabel: { fontFamily: fonts.bold, color: colors.ink },
  head: { gap: space.xs },
  table: { borderWidth: 1, borderColor: colors.line, borderRadius: radius.md, backgroundColor: colors.surface, overflow: 'hidden' },
  row: { flexDirection: 'row', borderBottomWidth: 1, borderBottomColor: colors.line, alignItems: 'center' },
  headRow: { backgroundColor: colors.paper, alignItems: 'stretch' },
  zebra: { backgroundColor: '#FAF8F3' },
  cell: { paddingHorizontal: space.sm, paddingVertical: space.sm, minWidth: 0, justifyContent: 'center' },
  sortButton: { minHeight: 40, justifyContent: 'center' },
  link: { color: colors.spruce, textDecorationLine: 'underline' },
  cards: { gap: space.md },
  facts: { flexDirection: 'row', flexWrap: 'wrap', rowGap: space.sm },
  fact: { width: '50%', gap: 2, paddingRight: space.sm },
});

/** "2 · longest 5 days": fixes waiting for the inspector (never overdue against the company) and the oldest wait. */
export function fixesWaitingText(c: Pick<CompanyScorecard, 'fixesWaiting' | 'longestWaitDays'>): string {
  if (c.fixesWaiting === 0 || c.longestWaitDays === null || c.longestWaitDays === undefined) return String(c.fixesWaiting);
  return `${c.fixesWaiting} · ${c.longestWaitDays <= 0 ? 'since today' : `longest ${c.longestWaitDays} ${c.longestWaitDays === 1 ? 'day' : 'days'}`}`;
}
