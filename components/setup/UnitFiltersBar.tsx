import { useEffect, useRef, useState } from 'react';
import { StyleSheet, View } from 'react-native';
import type { LevelDto, SpaceDto, SystemDto } from '../../shared/schemas/setup';
import { UNIT_KINDS, type UnitKindKey } from '../../shared/words';
import type { UnitFilters } from '../queries/units';
import { space } from '../theme';
import { Button } from '../ui/Button';
import { Select } from '../ui/Select';
import { TextField } from '../ui/TextField';

export const SEARCH_DELAY_MS = 300;

/**
 * Filters of the units register: level, space (of that level), system, unit kind, and a tag
 * search applied a moment after typing stops. Changing the level clears a space on another level.
 */
export function UnitFiltersBar({
  value,
  onChange,
  levels,
  spaces,
  systems,
  testID = 'unit-filters',
}: {
  value: UnitFilters;
  onChange: (next: UnitFilters) => void;
  levels: readonly LevelDto[];
  spaces: readonly SpaceDto[];
  systems: readonly SystemDto[];
  testID?: string;
}) {
  const [q, setQ] = useState(value.q ?? '');
  const latest = useRef({ value, onChange });
  latest.current = { value, onChange };

  useEffect(() => {
    if ((latest.current.value.q ?? '') === q.trim()) return;
    const t = setTimeout(() => latest.current.onChange({ ...latest.current.value, q: q.trim() || undefined }), SEARCH_DELAY_MS);
    return () => clearTimeout(t);
  }, [q]);

  const spaceOptions = spaces
    .filter((s) => !value.levelId || s.levelId === value.levelId)
    .map((s) => ({ value: s.id, label: value.levelId ? s.name : `${s.levelName} · ${s.name}` }));
  const active = Boolean(value.levelId || value.spaceId || value.systemId || value.kind || value.q);

  return (
    <View style={styles.bar} testID={testID}>
      <View style={styles.item}>
        <TextField
          label="Search by tag"
          testID={`${testID}-q`}
          value={q}
          onChangeText={setQ}
          placeholder="e.g. IU-3"
          autoCapitalize="characters"
          compact
        />
      </View>
      <View style={styles.item}>
        <Select
          compact
          label="Level"
          testID={`${testID}-level`}
          value={value.levelId ?? ''}
          placeholder="All levels"
          options={levels.map((l) => ({ value: l.id, label: l.name }))}
          onChange={(levelId) => {
            const keepSpace = value.spaceId && spaces.find((s) => s.id === value.spaceId)?.levelId === levelId;
            onChange({ ...value, levelId: levelId || undefined, spaceId: keepSpace ? value.spaceId : undefined });
          }}
        />
      </View>
      <View style={styles.item}>
        <Select
          compact
          label="Space"
          testID={`${testID}-space`}
          value={value.spaceId ?? ''}
          placeholder="All spaces"
          options={spaceOptions}
          onChange={(spaceId) => onChange({ ...value, spaceId: spaceId || undefined })}
        />
      </View>
      <View style={styles.item}>
        <Select
          compact
          label="System"
          testID={`${testID}-system`}
          value={value.systemId ?? ''}
          placeholder="All systems"
          options={systems.map((s) => ({ value: s.id, label: s.name }))}
          onChange={(systemId) => onChange({ ...value, systemId: systemId || undefined })}
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
      {active ? (
        <View style={styles.clear}>
          <Button
            label="Clear filters"
            tone="quiet"
            testID={`${testID}-clear`}
            onPress={() => {
              setQ('');
              onChange({});
            }}
          />
        </View>
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({
  bar: { flexDirection: 'row', flexWrap: 'wrap', gap: space.md, alignItems: 'flex-end' },
  item: { flexGrow: 1, flexBasis: 170, minWidth: 0 },
  clear: { justifyContent: 'flex-end' },
});
