import { Link } from 'expo-router';
import { useState } from 'react';
import { StyleSheet, useWindowDimensions, View } from 'react-native';
import type { FindingSort } from '../../shared/schemas/findings';
import { ApiError } from '../api/client';
import { ManyAtOnce } from '../correction/BulkBar';
import { ExportLink } from '../exports/ExportLink';
import { PickRow } from './PickRow';
import { ReportActions } from '../reports/ReportActions';
import { exportUrls } from '../api/exports';
import { useCatalogueQuery } from '../queries/catalogue';
import { useJobCompaniesQuery } from '../queries/companies';
import { useFindingsQuery, type FindingFilters } from '../queries/findings';
import { useJobQuery } from '../queries/jobs';
import { useLevelsQuery } from '../queries/levels';
import { useSpacesQuery } from '../queries/spaces';
import { useUnitsQuery } from '../queries/units';
import { colors, linkTarget, space } from '../theme';
import { AppText } from '../ui/AppText';
import { Button } from '../ui/Button';
import { Screen } from '../ui/Screen';
import { EmptyState, ErrorState, LoadingState } from '../ui/States';
import { FindingCard } from './FindingCard';
import { FindingsFilters } from './FindingsFilters';
import { FindingsTable, type TableSelection } from './FindingsTable';
import { DEFAULT_FINDING_SORT, links } from '../links';

/** The table takes over from cards at this width. */
export const TABLE_BREAKPOINT = 1024;

/**
 * Findings of the job: cards on a phone, a sortable table on a wide screen; filtered, counted, paged
 * by cursor. The filters and sort come from the route (they live in the address: links.findings).
 */
export function FindingsListScreen({
  jobId,
  filters,
  onFiltersChange,
}: {
  jobId: string;
  filters: FindingFilters;
  onFiltersChange: (next: FindingFilters) => void;
}) {
  const { width } = useWindowDimensions();
  const wide = width >= TABLE_BREAKPOINT;
  const job = useJobQuery(jobId);
  const findings = useFindingsQuery(jobId, filters);
  const levels = useLevelsQuery(jobId);
  const spaces = useSpacesQuery(jobId);
  const units = useUnitsQuery(jobId, { levelId: filters.levelId }, 200);
  const companies = useJobCompaniesQuery(jobId);
  const catalogue = useCatalogueQuery(jobId, { includeRetired: true });
  const first = findings.data?.pages[0];
  const rows = findings.data?.pages.flatMap((p) => p.items) ?? [];
  const filtered = Object.entries(filters).some(([k, v]) => k !== 'sort' && v !== undefined);
  const sort: FindingSort = filters.sort ?? DEFAULT_FINDING_SORT;
  // Every role acts on several at once: changes and accepted fixes, or one fix for many (subcontractor).
  const role = job.data?.role;
  const bulkAllowed = role !== undefined;
  const [selected, setSelected] = useState<string[]>([]);
  // Only rows on screen stay selected (a filter change drops the others).
  const shownSelected = selected.filter((id) => rows.some((r) => r.id === id));
  const selection: TableSelection | undefined = bulkAllowed
    ? {
        selected: new Set(shownSelected),
        onToggle: (id) => setSelected((now) => (now.includes(id) ? now.filter((x) => x !== id) : [...now, id])),
        onToggleAll: () => setSelected(rows.length > 0 && rows.every((r) => shownSelected.includes(r.id)) ? [] : rows.map((r) => r.id)),
      }
    : undefined;

  return (
    <Screen testID="findings-screen" maxWidth={wide ? 1200 : 720}>
      <Link href={links.job(jobId)} style={styles.back} testID="findings-back">
        <AppText variant="label" style={{ color: colors.spruce }}>
          ← {job.data?.name ?? 'The job'}
        </AppText>
      </Link>
      <View style={styles.head}>
        <AppText variant="display" role="heading">
          Findings
        </AppText>
        {first ? (
          <AppText muted testID="findings-total">
            {first.total} finding{first.total === 1 ? '' : 's'}
            {filtered ? ' match the filters' : ' on this job'}
          </AppText>
        ) : null}
      </View>
      {job.data && job.data.role !== 'subcontractor' ? (
        <Link href={links.walk(jobId)} asChild>
          <Button label="Walk a level" tone="secondary" testID="findings-walk" />
        </Link>
      ) : null}
      {first && first.total > 0 ? (
        <ExportLink
          href={exportUrls.findingsCsv(jobId, filters)}
          label={filtered ? `Export these ${first.total} as CSV` : 'Export all as CSV'}
          testID="findings-export"
        />
      ) : null}
      {first && first.total > 0 ? (
        <ReportActions
          jobId={jobId}
          place={{ levelId: filters.levelId, companyId: filters.companyId }}
          what={filters.levelId || filters.companyId ? 'of this level or company' : 'of the job'}
          crewList={filters.levelId && (filters.companyId || job.data?.role === 'subcontractor') ? { levelId: filters.levelId, companyId: filters.companyId } : null}
          testID="findings-reports"
        />
      ) : null}
      {first && first.total > 0 ? (
        <AppText variant="small" muted testID="findings-export-plain">
          The CSV is plain data, without the cautions: the manufacturer&apos;s installation manual, local codes and licensed practice govern.
        </AppText>
      ) : null}
      <FindingsFilters
        value={filters}
        onChange={onFiltersChange}
        counts={first?.counts}
        levels={levels.data ?? []}
        spaces={spaces.data ?? []}
        units={filters.levelId ? (units.data?.pages.flatMap((p) => p.items) ?? []) : []}
        companies={companies.data ?? []}
        catalogue={catalogue.data ?? []}
        showSort={!wide}
      />
      {findings.isPending ? (
        <LoadingState label="Loading the findings…" />
      ) : findings.isError ? (
        findings.error instanceof ApiError && findings.error.status === 404 ? (
          <EmptyState title="Job not found" body="This job does not exist, or you are not a member of it." testID="job-not-found" />
        ) : (
          <ErrorState message={findings.error.message} onRetry={() => findings.refetch()} />
        )
      ) : rows.length === 0 ? (
        <EmptyState
          title={filtered ? 'No finding matches' : 'No findings yet'}
          body={filtered ? 'Change or clear the filters.' : 'Findings logged on a walk show here.'}
          testID="findings-empty"
        />
      ) : (
        <View style={styles.list} testID="findings-list">
          {role ? (
            <ManyAtOnce
              jobId={jobId}
              role={role}
              selected={shownSelected}
              rows={rows}
              companies={companies.data ?? []}
              timeZone={job.data?.timeZone}
              onClear={() => setSelected([])}
            />
          ) : null}
          {wide ? (
            <FindingsTable jobId={jobId} rows={rows} sort={sort} onSort={(s) => onFiltersChange({ ...filters, sort: s })} selection={selection} />
          ) : (
            rows.map((f) =>
              selection ? (
                <PickRow key={f.id} label={f.label} checked={selection.selected.has(f.id)} onToggle={() => selection.onToggle(f.id)} testID={`finding-pick-${f.label}`}>
                  <FindingCard jobId={jobId} finding={f} />
                </PickRow>
              ) : (
                <FindingCard key={f.id} jobId={jobId} finding={f} />
              ),
            )
          )}
          <AppText variant="small" muted testID="findings-shown">
            Showing {rows.length} of {first?.total ?? rows.length}
          </AppText>
          {findings.hasNextPage ? (
            <Button label="Load more" tone="secondary" testID="findings-more" busy={findings.isFetchingNextPage} onPress={() => findings.fetchNextPage()} />
          ) : null}
        </View>
      )}
    </Screen>
  );
}

const styles = StyleSheet.create({
  back: linkTarget,
  head: { gap: space.xs },
  list: { gap: space.sm },
});
