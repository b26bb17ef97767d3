import { guessScheduleMapping, headerUnit, parseUnitKind, scheduleFieldOfHeader, splitHeader } from '../../../shared/rules/schedule';
import { UNIT_KINDS } from '../../../shared/words';

// Spellings as mechanical schedules commonly write them (common practice, gathered from the way
// schedules are typed; no one manufacturer's list).
describe('parseUnitKind', () => {
  it.each([
    ['4-WAY CASSETTE', 'cassette_4way'],
    ['Cassette 4 way', 'cassette_4way'],
    ['Ceiling cassette four-way', 'cassette_4way'],
    ['Ceiling Cassette, 4-Way', 'cassette_4way'],
    ['4WAY CASSETTE', 'cassette_4way'],
    ['Round flow cassette', 'cassette_4way'],
    ['2-way cassette', 'cassette_2way'],
    ['Ceiling cassette two-way', 'cassette_2way'],
    ['Compact cassette', 'cassette_compact'],
    ['Mini 4-way cassette 600x600', 'cassette_compact'],
    ['WALL MOUNT', 'wall_mounted'],
    ['Wall-mounted', 'wall_mounted'],
    ['High wall', 'wall_mounted'],
    ['HI-WALL', 'wall_mounted'],
    ['Floor console', 'floor_console'],
    ['FLOOR STANDING', 'floor_console'],
    ['Floor/Ceiling', 'floor_ceiling'],
    ['Ceiling suspended', 'floor_ceiling'],
    ['Convertible', 'floor_ceiling'],
    ['DUCTED HSP', 'ducted_high'],
    ['Ducted high static', 'ducted_high'],
    ['Ceiling concealed ducted, low static', 'ducted_low'],
    ['Slim duct', 'ducted_low'],
    ['DUCTED LSP', 'ducted_low'],
    ['Ducted very high static', 'ducted_very_high'],
    ['AHU coil kit', 'ahu_coil_kit'],
    ['Air handler', 'ahu_coil_kit'],
    ['wall_mounted', 'wall_mounted'],
    ['ducted_very_high', 'ducted_very_high'],
  ])('%s → %s', (text, kind) => {
    expect(parseUnitKind(text)).toBe(kind);
  });

  it('reads every kind key and label as itself', () => {
    for (const k of UNIT_KINDS) {
      expect(parseUnitKind(k.key)).toBe(k.key);
      expect(parseUnitKind(k.label)).toBe(k.key);
      expect(parseUnitKind(k.label.toUpperCase())).toBe(k.key);
    }
  });

  it.each(['Cassette', 'Ducted', 'DUCTED MSP', '1-way cassette', 'Window unit', 'VRF', '', '   '])('leaves "%s" to the user (not sure)', (text) => {
    expect(parseUnitKind(text)).toBeNull();
  });
});

describe('schedule headers', () => {
  it.each([
    ['Capacity (Btu/h)', 'capacity'],
    ['Cooling capacity (kW)', 'capacity'],
    ['Nominal cooling [MBH]', 'capacity'],
    ['Nominal capacity', 'capacity'],
    ['CAPACITY', 'capacity'],
    ['Tons', 'capacity'],
    ['Size (kW)', 'capacity'],
    ['Tag', 'tag'],
    ['Equipment tag', 'tag'],
    ['Unit type', 'kind'],
    ['Floor', 'level'],
    ['Room', 'space'],
    ['Room number', 'space'],
    ['Mounting position', 'mount'],
    ['Remarks', null],
    ['Floor area (m²)', null],
  ])('%s → %s', (header, field) => {
    expect(scheduleFieldOfHeader(header)).toBe(field);
  });

  it('reads the unit in brackets for bare numbers', () => {
    expect(headerUnit('Capacity (Btu/h)', 'capacity')).toBe('Btu/h');
    expect(headerUnit('Nominal cooling [MBH]', 'capacity')).toBe('MBH');
    expect(headerUnit('Room (north)', 'capacity')).toBeUndefined();
  });

  it('maps each field once, to the first header naming it', () => {
    expect(guessScheduleMapping(['Tag', 'Unit kind', 'Cooling capacity (kW)', 'Heating capacity (kW)', 'Floor', 'Room', 'Notes'])).toEqual({
      Tag: 'tag',
      'Unit kind': 'kind',
      'Cooling capacity (kW)': 'capacity',
      Floor: 'level',
      Room: 'space',
    });
  });
});

describe('a unit in a header (one reading for equipment and room schedules)', () => {
  it.each([
    ['Capacity (Btu/h)', { name: 'Capacity (Btu/h)', unit: 'Btu/h' }],
    ['Nominal cooling [MBH]', { name: 'Nominal cooling [MBH]', unit: 'MBH' }],
    ['Floor area (ft²)', { name: 'Floor area (ft²)', unit: 'ft²' }],
    ['Area m2', { name: 'Area', unit: 'm2' }],
    ['Area sq ft', { name: 'Area', unit: 'sq ft' }],
    ['Capacity kW', { name: 'Capacity', unit: 'kW' }],
    ['Clg_ht_mm', { name: 'Clg ht', unit: 'mm' }],
    ['Room (north)', { name: 'Room (north)' }],
    ['Tag', { name: 'Tag' }],
    ['m2', { name: 'm2' }],
  ])('%s → %j', (header, parts) => {
    expect(splitHeader(header)).toEqual(parts);
  });

  it.each([
    ['Capacity (Btu/h)', 'capacity', 'Btu/h'],
    ['Capacity kW', 'capacity', 'kW'],
    ['Size tons', 'capacity', 'tons'],
    ['Floor area (ft²)', 'area', 'ft²'],
    ['Floor area (ft²)', 'capacity', undefined],
    ['Clg ht [mm]', 'length', 'mm'],
    ['Clg ht [mm]', 'area', undefined],
    ['Capacity', 'capacity', undefined],
  ] as const)('%s gives %s numbers the unit %s', (header, kind, unit) => {
    expect(headerUnit(header, kind)).toBe(unit);
  });

  it('reads a capacity header whose unit follows the name as capacity', () => {
    expect(scheduleFieldOfHeader('Cooling kW')).toBe('capacity');
    expect(scheduleFieldOfHeader('Floor area m2')).toBeNull();
  });
});
