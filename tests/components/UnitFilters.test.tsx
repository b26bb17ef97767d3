/** The units register's filters: level narrows the spaces, a level change drops a space on another level, tag search waits for typing to stop. */
import { act, fireEvent, render, screen } from '@testing-library/react-native';
import { useState } from 'react';
import { SEARCH_DELAY_MS, UnitFiltersBar } from '../../components/setup/UnitFiltersBar';
import type { UnitFilters } from '../../components/queries/units';
import type { LevelDto, SpaceDto, SystemDto } from '../../shared/schemas/setup';

const L1 = '00000000-0000-4000-8000-000000000001';
const L2 = '00000000-0000-4000-8000-000000000002';
const level = (id: string, name: string, position: number): LevelDto => ({ id, name, position, spaceCount: 1, unitCount: 0, version: 1, plan: null });
const space = (id: string, levelId: string, levelName: string, name: string): SpaceDto => ({
  id,
  levelId,
  levelName,
  name,
  floorArea: 20,
  ceilingHeight: 2700,
  volume: 54,
  occupancy: 'general',
  enclosed: true,
  linkedSpaceIds: [],
  unitCount: 0,
  version: 1,
});
const levels = [level(L1, 'Level 1', 1), level(L2, 'Level 2', 2)];
const spaces = [space('s1', L1, 'Level 1', 'Lobby'), space('s2', L2, 'Level 2', 'Office 201')];
const systems: SystemDto[] = [];

function Harness({ onChange }: { onChange: (f: UnitFilters) => void }) {
  const [value, setValue] = useState<UnitFilters>({});
  return (
    <UnitFiltersBar
      value={value}
      onChange={(f) => {
        onChange(f);
        setValue(f);
      }}
      levels={levels}
      spaces={spaces}
      systems={systems}
    />
  );
}

/** The option in an open list (the field itself also shows the current choice's label). */
function option(label: string) {
  return screen.getAllByText(label).at(-1)!;
}

/** The phone Select: press the field, then the option. */
function choose(testID: string, label: string) {
  fireEvent.press(screen.getByTestId(testID));
  fireEvent.press(option(label));
}

describe('UnitFiltersBar', () => {
  it('filters by level, then offers only that level’s spaces', () => {
    const onChange = jest.fn();
    render(<Harness onChange={onChange} />);
    // all spaces are offered, with their level, before a level is chosen
    fireEvent.press(screen.getByTestId('unit-filters-space'));
    expect(screen.getByText('Level 1 · Lobby')).toBeTruthy();
    expect(screen.getByText('Level 2 · Office 201')).toBeTruthy();
    fireEvent.press(option('All spaces'));

    choose('unit-filters-level', 'Level 2');
    expect(onChange).toHaveBeenLastCalledWith({ levelId: L2, spaceId: undefined });
    fireEvent.press(screen.getByTestId('unit-filters-space'));
    expect(screen.getByText('Office 201')).toBeTruthy();
    expect(screen.queryByText('Lobby')).toBeNull();
    fireEvent.press(option('Office 201'));
    expect(onChange).toHaveBeenLastCalledWith({ levelId: L2, spaceId: 's2' });

    // another level drops the space; the same level keeps it
    choose('unit-filters-level', 'Level 1');
    expect(onChange).toHaveBeenLastCalledWith({ levelId: L1, spaceId: undefined });
  });

  it('filters by unit kind and clears everything at once', () => {
    const onChange = jest.fn();
    render(<Harness onChange={onChange} />);
    expect(screen.queryByTestId('unit-filters-clear')).toBeNull();
    choose('unit-filters-kind', 'Wall-mounted');
    expect(onChange).toHaveBeenLastCalledWith({ kind: 'wall_mounted' });
    fireEvent.press(screen.getByTestId('unit-filters-clear'));
    expect(onChange).toHaveBeenLastCalledWith({});
  });

  it('searches by tag once typing stops', () => {
    jest.useFakeTimers();
    try {
      const onChange = jest.fn();
      render(<Harness onChange={onChange} />);
      fireEvent.changeText(screen.getByTestId('unit-filters-q'), 'IU-');
      fireEvent.changeText(screen.getByTestId('unit-filters-q'), 'IU-3');
      expect(onChange).not.toHaveBeenCalled();
      act(() => {
        jest.advanceTimersByTime(SEARCH_DELAY_MS);
      });
      expect(onChange).toHaveBeenCalledTimes(1);
      expect(onChange).toHaveBeenLastCalledWith({ q: 'IU-3' });
    } finally {
      jest.useRealTimers();
    }
  });
});
