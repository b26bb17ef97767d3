import { useState } from 'react';
import { Pressable, StyleSheet, View } from 'react-native';
import { UNIT_WALK_STATE_LABELS, type UnitWalkState } from '../../shared/schemas/findings';
import type { SpaceDto, SystemDto } from '../../shared/schemas/setup';
import { UNIT_KINDS, type UnitKindKey } from '../../shared/words';
import type { WalkUnitFilters } from '../queries/walks';
import { choiceChip, colors, fonts, space } from '../theme';
import { AppText } from '../ui/AppText';
import { Button } from '../ui/Button';
import { Select } from '../ui/Select';
import { TextField } from '../ui/TextField';
import { useSearchBox } from '../useSearchBox';

export const TAG_SEARCH_DELAY_MS = 250;
const STATES: UnitWalkState[] = ['not_checked', 'open_findings', 'in_progress', 'checked_ok'];

/** The walk list's filters: find by part of a tag (applied as typing pauses), state, space, system, kind. */
export function WalkFilters({
  value,
  onChange,
  spaces,
  systems,
  testID = 'walk-filters',
}: {
  value: WalkUnitFilters;
  onChange: (next: WalkUnitFilters) => void;
  spaces: readonly SpaceDto[];
  systems: readonly SystemDto[];
  testID?: string;
}) {
  const [q, setQ] = useSearchBox(value, onChange, TAG_SEARCH_DELAY_MS);
  const [more, setMore] = useState(Boolean(value.spaceId || value.systemId || value.kind));
  const extra = [value.spaceId, value.systemId, value.kind].filter(Boolean).length;

  return (
    <View style={styles.wrap} testID={testID}>
      <TextField
        label="Find a unit by tag"
        testID={`${testID}-q`}
        value={q}
        onChangeText={setQ}
        placeholder="Type part of the tag, e.g. 07"
        autoCapitalize="characters"
        autoCorrect={false}
        compact
      />
      <View style={styles.states} role="radiogroup" accessibilityLabel="Unit state">
        {([undefined, ...STATES] as (UnitWalkState | undefined)[]).map((s) => {
          const on = value.state === s;
          return (
            <Pressable
              key={s ?? 'all'}
              role="radio"
              aria-checked={on}
              accessibilityState={{ checked: on }}
              testID={`${testID}-state-${s ?? 'all'}`}
              onPress={() => onChange({ ...value, state: s })}
              style={[styles.chip, on ? styles.chipOn : null]}
            >
              <AppText style={[styles.chipText, on ? styles.chipTextOn : null]}>
                {on ? '✓ ' : ''}
                {s ? UNIT_WALK_STATE_LABELS[s] : 'All'}
              </AppText>
            </Pressable>
          );
        })}
      </View>
      <Button
        label={more ? 'Fewer filters' : `Space, system, kind${extra ? ` (${extra} on)` : ''}`}
        tone="quiet"
        testID={`${testID}-more`}
        onPress={() => setMore((m) => !m)}
      />
      {more ? (
        <View style={styles.more}>
          <Select
            label="Space"
            testID={`${testID}-space`}
            value={value.spaceId ?? ''}
            placeholder="All spaces"
            options={spaces.map((s) => ({ value: s.id, label: s.name }))}
            onChange={(spaceId) => onChange({ ...value, spaceId: spaceId || undefined })}
            compact
          />
          <Select
            label="System"
            testID={`${testID}-system`}
            value={value.systemId ?? ''}
            placeholder="All systems"
            options={systems.map((s) => ({ value: s.id, label: s.name }))}
            onChange={(systemId) => onChange({ ...value, systemId: systemId || undefined })}
            compact
          />
          <Select
            label="Unit kind"
            testID={`${testID}-kind`}
            value={value.kind ?? ''}
            placeholder="All kinds"
            options={UNIT_KINDS.map((k) => ({ value: k.key, label: k.label }))}
            onChange={(kind) => onChange({ ...value, kind: (kind || undefined) as UnitKindKey | undefined })}
            compact
          />
          {extra ? (
            <Button
              label="Clear space, system and kind"
              tone="quiet"
              testID={`${testID}-clear`}
              onPress={() => onChange({ ...value, spaceId: undefined, systemId: undefined, kind: undefined })}
            />
          ) : null}
        </View>
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({
  wrap: { gap: space.sm },
  states: { flexDirection: 'row', flexWrap: 'wrap', gap: space.xs },
  chip: choiceChip,
  chipOn: { borderColor: colors.spruce, backgroundColor: colors.spruceSoft },
  chipText: { fontFamily: fonts.regular, fontSize: 15 },
  chipTextOn: { fontFamily: fonts.bold, color: colors.spruce },
  more: { gap: space.md },
});
