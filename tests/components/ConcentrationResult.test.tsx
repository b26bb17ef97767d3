/**
 * The system's refrigerant checks shown in words: the A2L floor-area rows give each of the three
 * outcomes of IEC 60335-2-40:2018 Annex GG their own badge (below m1 no requirement; between m1
 * and m2 A_min; above m2 neither pass nor fail: the design must show additional measures).
 * Charges are R-32 (LFL 0.307 kg/m³, Annex BB); m1 = 6 m³ × LFL, m2 = 26 m³ × LFL (from memory).
 */
import { render, screen, within } from '@testing-library/react-native';
import { ConcentrationResultView } from '../../components/setup/ConcentrationResult';
import { checkA2lFloorArea, checkRefrigerantConcentration, type MountPosition } from '../../shared/calc/refrigerant';
import type { SystemDetail } from '../../shared/schemas/setup';

function detail(chargeKg: number, rows: Array<{ tag: string; area: number; mount: MountPosition }>): SystemDetail {
  return {
    id: 'sys-1',
    name: 'VRF-8',
    outdoorModel: null,
    refrigerant: 'R-32',
    factoryCharge: chargeKg,
    fieldCharge: 0,
    totalCharge: chargeKg,
    concentrationLimitOverride: null,
    companyId: null,
    chargeBasis: null,
    chargeRecord: null,
    unitCount: rows.length,
    version: 1,
    concentration: checkRefrigerantConcentration({
      refrigerant: 'R-32',
      factoryCharge: chargeKg,
      fieldCharge: 0,
      servedSpaceIds: ['a'],
      spaces: [{ id: 'a', name: 'Room', floorArea: 100, ceilingHeight: 2700 }],
      system: 'metric',
    }),
    a2lFloorArea: rows.map((r) => ({
      unitId: r.tag,
      tag: r.tag,
      spaceId: 'a',
      spaceName: 'Room',
      mount: r.mount,
      mountFrom: 'unit' as const,
      result: checkA2lFloorArea({ refrigerant: 'R-32', chargeKg, floorArea: r.area, mount: r.mount, system: 'metric' }),
    })),
  };
}

describe('A2L floor area rows', () => {
  it('1.5 kg in a 15 m² room: below m1, no room-area requirement', () => {
    render(<ConcentrationResultView detail={detail(1.5, [{ tag: 'IU-1', area: 15, mount: 'ceiling' }])} unitSystem="metric" />);
    expect(within(screen.getByTestId('a2l-status-IU-1')).getByText('Below m1: no room-area requirement')).toBeTruthy();
  });

  it('between m1 and m2: enough floor area or the room too small, by mounting position', () => {
    render(
      <ConcentrationResultView
        detail={detail(3, [
          { tag: 'IU-C', area: 20, mount: 'ceiling' },
          { tag: 'IU-F', area: 20, mount: 'floor' },
        ])}
        unitSystem="metric"
      />,
    );
    expect(within(screen.getByTestId('a2l-status-IU-C')).getByText('Enough floor area')).toBeTruthy();
    expect(within(screen.getByTestId('a2l-status-IU-F')).getByText('Room too small')).toBeTruthy();
    expect(within(screen.getByTestId('a2l-IU-F')).getByText(/floor-standing/)).toBeTruthy();
  });

  it('above m2: neither pass nor fail, the design must show additional measures', () => {
    render(<ConcentrationResultView detail={detail(9, [{ tag: 'IU-9', area: 500, mount: 'wall' }])} unitSystem="metric" />);
    expect(within(screen.getByTestId('a2l-status-IU-9')).getByText('Design must show additional measures')).toBeTruthy();
    expect(within(screen.getByTestId('a2l-IU-9')).getByText(/ventilation, leak detection, shut-off/)).toBeTruthy();
  });
});

describe('concentration limit source', () => {
  it('names the table applied and where else the figure is printed (R-32: IMC Table 1103.1, issue text; ASHRAE 34 Table 4-1, from memory)', () => {
    render(<ConcentrationResultView detail={detail(1.5, [])} unitSystem="metric" />);
    const source = screen.getByTestId('concentration-source');
    expect(within(source).getByText(/Source: IMC 2018 Table 1103\.1/)).toBeTruthy();
    expect(within(source).getByText(/Also printed in ASHRAE 34 Table 4-1/)).toBeTruthy();
  });
});
