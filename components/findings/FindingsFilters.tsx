import { useState } from 'react';
import { Pressable, StyleSheet, View } from 'react-native';
import type { FindingListResponse, FindingSort } from '../../shared/schemas/findings';
import type { CatalogueItemDto, JobCompanyDto, LevelDto, SpaceDto, UnitDto } from '../../shared/schemas/setup';
import { FINDING_STATUSES, FINDING_STATUS_LABELS, SEVERITIES, SEVERITY_LABELS, UNIT_KINDS, type FindingStatus, type Severity, type UnitKindKey } from '../../shared/words';
import type { FindingFilters } from '../queries/findings';
import { choiceChip, colors, fonts, space } from '../theme';
import { AppText } from '../ui/AppText';
import { Button } from '../ui/Button';
import { Select } from '../ui/Select';
import { TextField } from '../ui/TextField';
import { SeverityShape } from '../walk/SeverityMark';
import { useSearchBox } from '../useSearchBox';

export const FINDING_SEARCH_DELAY_MS = 300;

const SORT_LABELS: Record<FindingSort, string> = {
  '-number': 'Newest first',
  number: 'Oldest first',
  dueOn: 'Due soonest',
  '-dueOn': 'Due latest',
  severity: 'Critical first',
  '-severity': 'Minor first',
  '-loggedAt': 'Logged, newest',
  loggedAt: 'Logged, oldest',
};

function split<T extends string>(s: string | undefined): T[] {
  return s ? (s.split(',').filter(Boolean) as T[]) : [];
}
function toggle<T extends string>(list: T[], v: T): string | undefined {
  const next = list.includes(v) ? list.filter((x) => x !== v) : [...list, v];
  return next.length ? next.join(',') : undefined;
}

/** The list's filters: text, status and severity (with counts), then level, space, unit, kind, company, defect type, order. */
export function FindingsFilters({
  value,
  onChange,
  counts,
  levels,
  spaces,
  units,
  companies,
  catalogue,
  showSort,
  testID = 'findings-filters',
}: {
  value: FindingFilters;
  onChange: (next: FindingFilters) => void;
  counts: FindingListResponse['counts'] | undefined;
  levels: readonly LevelDto[];
  spaces: readonly SpaceDto[];
  units: readonly UnitDto[];
  companies: readonly JobCompanyDto[];
  catalogue: readonly CatalogueItemDto[];
  showSort: boolean;
  testID?: string;
}) {
  const [q, setQ] = useSearchBox(value, onChange, FINDING_SEARCH_DELAY_MS);
  const extra = [value.levelId, value.spaceId, value.unitId, value.kind, value.companyId, value.catalogueItemId].filter(Boolean).length;
  // Closed at first even with filters from the address: on a phone the findings come first.
  const [more, setMore] = useState(false);
  const statuses = split<FindingStatus>(value.status as string | undefined);
  const severities = split<Severity>(value.severity as string | undefined);
  const spaceOptions = spaces.filter((s) => !value.levelId || s.levelId === value.levelId);

  return (
    <View style={styles.wrap} testID={testID}>
      <TextField
        label="Search"
        testID={`${testID}-q`}
        value={q}
        onChangeText={setQ}
        placeholder="Tag, defect, note or #number"
        autoCorrect={false}
        compact
      />
      <View style={styles.chips} accessibilityLabel="Status">
        {FINDING_STATUSES.map((s) => {
          const on = statuses.includes(s);
          return (
            <Pressable
              key={s}
              role="checkbox"
              aria-checked={on}
              accessibilityState={{ checked: on }}
              testID={`${testID}-status-${s}`}
              onPress={() => onChange({ ...value, status: toggle(statuses, s) })}
              style={[styles.chip, on ? styles.chipOn : null]}
            >
              <AppText style={[styles.chipText, on ? styles.chipTextOn : null]}>
                {on ? '✓ ' : ''}
                {FINDING_STATUS_LABELS[s]}
                {counts ? ` ${counts.byStatus[s]}` : ''}
              </AppText>
            </Pressable>
          );
        })}
      </View>
      <View style={styles.chips} accessibilityLabel="Severity">
        {SEVERITIES.map((s) => {
          const on = severities.includes(s);
          return (
            <Pressable
              key={s}
              role="checkbox"
              aria-checked={on}
              accessibilityState={{ checked: on }}
              testID={`${testID}-severity-${s}`}
              onPress={() => onChange({ ...value, severity: toggle(severities, s) })}
              style={[styles.chip, styles.sevChip, on ? styles.chipOn : null]}
            >
              <SeverityShape severity={s} size={13} />
              <AppText style={[styles.chipText, on ? styles.chipTextOn : null]}>
                {SEVERITY_LABELS[s]}
                {counts ? ` ${counts.bySeverity[s]}` : ''}
              </AppText>
            </Pressable>
          );
        })}
      </View>
      <View style={styles.chips} accessibilityLabel="Due">
        <Pressable
          role="checkbox"
          aria-checked={value.overdue === 'true'}
          accessibilityState={{ checked: value.overdue === 'true' }}
          testID={`${testID}-overdue`}
          onPress={() => onChange({ ...value, overdue: value.overdue === 'true' ? undefined : 'true' })}
          style={[styles.chip, value.overdue === 'true' ? styles.chipOn : null]}
        >
          <AppText style={[styles.chipText, value.overdue === 'true' ? styles.chipTextOn : null]}>
            {value.overdue === 'true' ? '✓ ' : ''}Overdue only
          </AppText>
        </Pressable>
      </View>
      <Button
        label={more ? 'Fewer filters' : `More filters${extra ? ` (${extra} on)` : ''}`}
        tone="quiet"
        testID={`${testID}-more`}
        onPress={() => setMore((m) => !m)}
      />
      {more ? (
        <View style={styles.grid}>
          <View style={styles.item}>
            <Select
              compact
              label="Level"
              testID={`${testID}-level`}
              value={value.levelId ?? ''}
              placeholder="All levels"
              options={levels.map((l) => ({ value: l.id, label: l.name }))}
              onChange={(levelId) => onChange({ ...value, levelId: levelId || undefined, spaceId: undefined, unitId: undefined })}
            />
          </View>
          <View style={styles.item}>
            <Select
              compact
              label="Space"
              testID={`${testID}-space`}
              value={value.spaceId ?? ''}
              placeholder="All spaces"
              options={spaceOptions.map((s) => ({ value: s.id, label: value.levelId ? s.name : `${s.levelName} · ${s.name}` }))}
              onChange={(spaceId) => onChange({ ...value, spaceId: spaceId || undefined })}
            />
          </View>
          <View style={styles.item}>
            <Select
              compact
              label="Unit"
              testID={`${testID}-unit`}
              value={value.unitId ?? ''}
              placeholder={value.levelId ? 'All units' : 'All units (choose a level to pick one)'}
              options={units.map((u) => ({ value: u.id, label: u.tag }))}
              onChange={(unitId) => onChange({ ...value, unitId: unitId || undefined })}
            />
          </View>
          <View style={styles.item}>
            <Select
              compact
              label="Unit kind"
              testID={`${testID}-kind`}
              value={value.kind ?? ''}
              placeholder="All kinds"
              options={UNIT_KINDS.map((k) => ({ value: k.key, label: k.label }))}
              onChange={(kind) => onChange({ ...value, kind: (kind || undefined) as UnitKindKey | undefined })}
            />
          </View>
          <View style={styles.item}>
            <Select
              compact
              label="Company"
              testID={`${testID}-company`}
              value={value.companyId ?? ''}
              placeholder="All companies"
              options={companies.map((c) => ({ value: c.id, label: c.name }))}
              onChange={(companyId) => onChange({ ...value, companyId: companyId || undefined })}
            />
          </View>
          <View style={styles.item}>
            <Select
              compact
              label="Defect type"
              testID={`${testID}-type`}
              value={value.catalogueItemId ?? ''}
              placeholder="All defect types"
              options={[...catalogue].sort((a, b) => a.code.localeCompare(b.code)).map((c) => ({ value: c.id, label: `${c.code} · ${c.title}` }))}
              onChange={(catalogueItemId) => onChange({ ...value, catalogueItemId: catalogueItemId || undefined })}
            />
          </View>
          {showSort ? (
            <View style={styles.item}>
              <Select
                compact
                label="Order"
                testID={`${testID}-sort`}
                value={value.sort ?? '-number'}
                options={(Object.keys(SORT_LABELS) as FindingSort[]).map((s) => ({ value: s, label: SORT_LABELS[s] }))}
                onChange={(sort) => onChange({ ...value, sort: sort as FindingSort })}
              />
            </View>
          ) : null}
          <Button
            label="Clear all filters"
            tone="quiet"
            testID={`${testID}-clear`}
            onPress={() => {
              setQ('');
              onChange({ sort: value.sort });
            }}
          />
        </View>
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({
  wrap: { gap: space.sm },
  chips: { flexDirection: 'row', flexWrap: 'wrap', gap: space.xs },
  chip: choiceChip,
  sevChip: { flexDirection: 'row', alignItems: 'center', gap: space.xs },
  chipOn: { borderColor: colors.spruce, backgroundColor: colors.spruceSoft },
  chipText: { fontFamily: fonts.regular, fontSize: 15 },
  chipTextOn: { fontFamily: fonts.bold, color: colors.spruce },
  grid: { flexDirection: 'row', flexWrap: 'wrap', gap: space.md, alignItems: 'flex-end' },
  item: { flexGrow: 1, flexBasis: 220, minWidth: 0 },
});
