/**
 * What the import preview asks of the user beyond the columns: the kind of each value of the
 * file's kind column (read, kept from an earlier import, or to be chosen), whether to create the
 * levels and spaces the file names that the job lacks, and what a revised schedule changes.
 */
import { Pressable, StyleSheet, View } from 'react-native';
import { formatQuantity } from '../../shared/calc/format';
import type { UnitSystem } from '../../shared/catalogue/types';
import type { UnitImportFieldChange, UnitImportKindValue, UnitImportReport } from '../../shared/schemas/setup';
import { UNIT_KINDS, unitKindLabel, type UnitKindKey } from '../../shared/words';
import { choiceChip, colors, space } from '../theme';
import { AppText } from '../ui/AppText';
import { Badge } from '../ui/Badge';
import { Notice } from '../ui/Notice';
import { Select } from '../ui/Select';

const KIND_OPTIONS = UNIT_KINDS.map((k) => ({ value: k.key, label: k.label }));
const FROM_WORDS: Record<NonNullable<UnitImportKindValue['from']>, string> = {
  read: 'read from the words',
  mapped: 'your choice',
  saved: 'as chosen for an earlier import of this job',
};

/** A box to tick (role checkbox), in the one chip look. */
export function Tick({ label, checked, onChange, testID }: { label: string; checked: boolean; onChange: (on: boolean) => void; testID?: string }) {
  return (
    <Pressable
      role="checkbox"
      aria-checked={checked}
      accessibilityState={{ checked }}
      accessibilityLabel={label}
      testID={testID}
      onPress={() => onChange(!checked)}
      style={[styles.tick, checked ? styles.tickOn : null]}
    >
      <AppText style={checked ? styles.tickTextOn : null}>
        {checked ? '☑ ' : '☐ '}
        {label}
      </AppText>
    </Pressable>
  );
}

/**
 * Each value of the file's kind column with the kind it gives. A value Trimout cannot read must be
 * given a kind here; any other may be changed. Choices are kept for the job's next import.
 */
export function KindValues({
  values,
  chosen,
  onChoose,
}: {
  values: UnitImportKindValue[];
  chosen: Record<string, UnitKindKey>;
  onChoose: (value: string, kind: UnitKindKey | null) => void;
}) {
  if (values.length === 0) return null;
  const open = values.filter((v) => v.kind === null && !chosen[v.value]).length;
  return (
    <View style={styles.box} testID="import-kinds">
      <AppText variant="label">Unit kinds in the file</AppText>
      <AppText variant="small" muted>
        {`Trimout's unit kinds: ${UNIT_KINDS.map((k) => k.label).join('; ')}. Choose one for each value the file writes its own way; your choice is kept for this job's next import.`}
      </AppText>
      {open > 0 ? (
        <Notice tone="caution" testID="import-kinds-open">
          {`Choose a unit kind for ${open} value${open === 1 ? '' : 's'}, then preview again.`}
        </Notice>
      ) : null}
      <View role="list" style={styles.kindList}>
        {values.map((v, i) => (
          <View key={v.value} role="listitem" style={styles.kindRow} testID={`import-kind-${i}`}>
            <View style={styles.kindValue}>
              <AppText variant="label">&quot;{v.value}&quot;</AppText>
              <AppText variant="small" muted>
                {`${v.rows} row${v.rows === 1 ? '' : 's'}${v.kind && v.from ? ` · ${FROM_WORDS[v.from]}` : ' · not sure what this is'}`}
              </AppText>
            </View>
            <View style={styles.kindSelect}>
              <Select
                compact
                label={`Unit kind for "${v.value}"`}
                testID={`import-kind-select-${i}`}
                value={chosen[v.value] ?? v.kind ?? ''}
                placeholder="Choose a unit kind"
                options={KIND_OPTIONS}
                onChange={(k) => onChoose(v.value, k === '' ? null : (k as UnitKindKey))}
              />
            </View>
          </View>
        ))}
      </View>
    </View>
  );
}

/** The levels and spaces the file names that the job lacks, with the tick that creates them. */
export function MissingPlaces({ report, create, onCreate }: { report: UnitImportReport; create: boolean; onCreate: (on: boolean) => void }) {
  const { levels, spaces } = report.missingPlaces;
  if (levels.length === 0 && spaces.length === 0) return null;
  const parts = [levels.length > 0 ? `${levels.length} level${levels.length === 1 ? '' : 's'}` : null, spaces.length > 0 ? `${spaces.length} space${spaces.length === 1 ? '' : 's'}` : null].filter(Boolean);
  const done = report.committed && report.placesCreated;
  return (
    <View style={styles.box} testID="import-places">
      <AppText variant="label">{done ? `Created ${parts.join(' and ')}` : `The file names ${parts.join(' and ')} this job does not have yet`}</AppText>
      {levels.length > 0 ? (
        <AppText variant="small" testID="import-places-levels">
          {`Levels: ${levels.join(', ')}`}
        </AppText>
      ) : null}
      {spaces.length > 0 ? (
        <AppText variant="small" testID="import-places-spaces">
          {`Spaces: ${spaces.map((s) => `${s.space} (${s.level})`).join(', ')}`}
        </AppText>
      ) : null}
      {!report.committed ? (
        <Tick
          testID="import-create-places"
          label={`Create them with the import (${parts.join(' and ')}; all or nothing, like the units)`}
          checked={create}
          onChange={(on) => onCreate(on)}
        />
      ) : null}
    </View>
  );
}

function shown(change: UnitImportFieldChange, value: string | number | null, unitSystem: UnitSystem): string {
  if (value === null || value === '') return '—';
  if (change.field === 'capacity' && typeof value === 'number') return formatQuantity(value, 'capacity', unitSystem);
  if (change.field === 'kind') return unitKindLabel(String(value));
  return String(value);
}

const CHANGE_LABEL: Record<string, string> = {
  kind: 'Kind',
  model: 'Model',
  capacity: 'Capacity',
  level: 'Level',
  space: 'Space',
  system: 'System',
  crew: 'Crew',
  mount: 'Mounting',
};

/** How many changed units to list on screen. */
export const CHANGES_SHOWN = 25;

/** Against the units already in the job: new, changed field by field, unchanged, and not in the file. */
export function RevisionView({
  report,
  unitSystem,
  removeMissing,
  onRemoveMissing,
}: {
  report: UnitImportReport;
  unitSystem: UnitSystem;
  removeMissing: boolean;
  onRemoveMissing: (on: boolean) => void;
}) {
  const r = report.revision;
  if (r.changed.length === 0 && r.untouched === 0 && r.notInFile.length === 0) return null;
  const removable = r.notInFile.filter((n) => n.removable);
  const kept = r.notInFile.filter((n) => !n.removable);
  return (
    <View style={styles.box} testID="import-revision">
      <AppText variant="label">Against the units already in this job (matched by tag)</AppText>
      <View style={styles.counts}>
        <Badge label={`${r.added} new`} tone={r.added > 0 ? 'good' : 'neutral'} testID="import-rev-added" />
        <Badge label={`${r.changed.length} changed`} tone={r.changed.length > 0 ? 'warn' : 'neutral'} testID="import-rev-changed" />
        <Badge label={`${r.untouched} unchanged`} tone="neutral" testID="import-rev-untouched" />
        <Badge label={`${r.notInFile.length} not in the file`} tone="neutral" testID="import-rev-missing" />
      </View>
      {r.changed.length > 0 ? (
        <View role="list" style={styles.changes} testID="import-changes">
          {r.changed.slice(0, CHANGES_SHOWN).map((c) => (
            <View key={c.tag} role="listitem" style={styles.changeRow} testID={`import-change-${c.tag}`}>
              <AppText variant="label">{c.tag}</AppText>
              {c.fields.map((f) => (
                <AppText key={f.field} variant="small" style={styles.changeText}>
                  {`${CHANGE_LABEL[f.field] ?? f.field}: ${shown(f, f.from, unitSystem)} → ${shown(f, f.to, unitSystem)}`}
                </AppText>
              ))}
            </View>
          ))}
          {r.changed.length > CHANGES_SHOWN ? (
            <AppText variant="small" muted>{`…and ${r.changed.length - CHANGES_SHOWN} more changed units.`}</AppText>
          ) : null}
        </View>
      ) : null}
      {r.notInFile.length > 0 ? (
        <View style={styles.box} testID="import-not-in-file">
          <AppText variant="small">
            {`In the job, not in the file: ${r.notInFile.slice(0, 20).map((n) => n.tag).join(', ')}${r.notInFile.length > 20 ? ` and ${r.notInFile.length - 20} more` : ''}. They stay unless you choose otherwise.`}
          </AppText>
          {kept.length > 0 ? (
            <AppText variant="small" muted>
              {`${kept.length === 1 ? `${kept[0]!.tag} has` : `${kept.length} of them have`} a unit check or a finding and always stay${kept.length === 1 ? 's' : ''}.`}
            </AppText>
          ) : null}
          {!report.committed && removable.length > 0 ? (
            <Tick
              testID="import-remove-missing"
              label={`Delete the ${removable.length} unit${removable.length === 1 ? '' : 's'} not in the file`}
              checked={removeMissing}
              onChange={onRemoveMissing}
            />
          ) : null}
        </View>
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({
  box: { gap: space.sm },
  counts: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm },
  tick: { ...choiceChip, alignSelf: 'flex-start', maxWidth: '100%' },
  tickOn: { borderColor: colors.spruce, backgroundColor: colors.spruceSoft },
  tickTextOn: { color: colors.spruce, fontWeight: '600' },
  kindList: { gap: space.sm },
  kindRow: { flexDirection: 'row', flexWrap: 'wrap', gap: space.md, alignItems: 'center', paddingVertical: space.xs, borderBottomWidth: 1, borderBottomColor: colors.line },
  kindValue: { flexGrow: 1, flexBasis: 200, minWidth: 0 },
  kindSelect: { flexGrow: 1, flexBasis: 240, minWidth: 0 },
  changes: { gap: space.sm },
  changeRow: { gap: 2, paddingVertical: space.xs, borderBottomWidth: 1, borderBottomColor: colors.line },
  changeText: { flexShrink: 1 },
});
