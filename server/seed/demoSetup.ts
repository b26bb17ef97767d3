/**
 * The demo job's set-up: levels, spaces, 8 systems, unit models with per-model limits, about
 * 120 units, the companies on the job with their trades, and the catalogue. All invented: no
 * real building, company, brand or product model. Idempotent: each part is created only when
 * missing, so running it again changes nothing.
 *
 * One system is meant to fail the refrigerant concentration check: VRF-3 (R-410A, 38 lb) serves
 * "Office 3-12", 10 × 10 ft with an 8 ft ceiling: 800 ft³ × 26 lb per 1,000 ft³ allows 20.8 lb.
 */
import type { Transaction } from 'sequelize';
import { MODEL_LIMITS, type ModelLimitKey, type QuantityKind } from '../../shared/catalogue/types';
import { toBase } from '../../shared/calc/quantity';
import type { MountPosition } from '../../shared/calc/refrigerant';
import type { StatedLimitDto } from '../../shared/schemas/setup';
import type { Refrigerant, TradeKey, UnitKindKey } from '../../shared/words';
import type { Database } from '../db';
import { copyBuiltinCatalogue } from '../services/catalogue';
import { statedLimit } from '../services/quantities';

type CompanyKey = 'gc' | 'inspection' | 'mechanical' | 'electrical' | 'ceilings';

/** The trades each demo company covers on the demo jobs. */
export const DEMO_COMPANY_TRADES: Record<CompanyKey, TradeKey[]> = {
  gc: ['general'],
  inspection: [],
  mechanical: ['mechanical', 'plumbing', 'insulation', 'controls'],
  electrical: ['electrical'],
  ceilings: ['ceilings', 'drywall'],
};

/**
 * Every demo limit is an invented round figure for an invented model, not any real product's
 * rating and not a trade rule: a real job enters each value from its model's installation manual.
 */
function inventedSource(modelNumber: string, page: number): string {
  return `Invented demo model ${modelNumber}, invented installation manual p. ${page}: not a real product's rating. Enter the value from the model's own installation manual.`;
}

interface ModelSpec {
  name: string;
  modelNumber: string;
  unitKind: UnitKindKey;
  capacity: string;
  limits: Partial<Record<ModelLimitKey, string>>;
  /** Installation position (A2L release height); left out where the kind can be either way up. */
  mountPosition?: MountPosition;
}

/** Invented round limits the three cassette models share (their ceiling openings differ). */
const CASSETTE_LIMITS = {
  max_pump_lift: '30 in',
  max_drain_horizontal_run: '10 ft',
  max_level_deviation: '1/4 in',
  min_distance_to_wall: '3 ft',
  min_body_to_ceiling: '1/2 in',
  max_body_to_ceiling: '1 in',
} as const;
/** Invented round limits of the two wall models. */
const WALL_LIMITS = {
  min_clearance_top: '6 in',
  min_clearance_side: '4 in',
  max_level_deviation: '1/8 in',
  min_mount_height: '7 ft',
  max_accessory_pump_lift: '6 ft',
  min_pipe_hole_slope: '1/4 in/ft',
} as const;
/** Invented round limits the ducted models share (their static pressure ranges differ). */
const DUCTED_LIMITS = { max_pump_lift: '24 in', max_drain_horizontal_run: '10 in', max_level_deviation: '1/4 in', min_clearance_front: '2 ft' } as const;

/** Invented unit models. Limits are invented round figures, typed the way the trade writes them. */
export const DEMO_MODELS: ModelSpec[] = [
  // Every limit the kind's checks read, so a demo walk shows limits rather than "Limit not set".
  {
    name: 'Cassette 4-way 18',
    modelNumber: 'TC4-18',
    unitKind: 'cassette_4way',
    capacity: '18000 Btu/h',
    limits: { ...CASSETTE_LIMITS, min_ceiling_opening: '24 in', max_ceiling_opening: '26 in' },
  },
  {
    name: 'Compact cassette 12',
    modelNumber: 'CC4-12',
    unitKind: 'cassette_compact',
    capacity: '12000 Btu/h',
    limits: { ...CASSETTE_LIMITS, min_ceiling_opening: '22 in', max_ceiling_opening: '23 in' },
  },
  {
    name: 'Two-way cassette 24',
    modelNumber: 'TC2-24',
    unitKind: 'cassette_2way',
    capacity: '24000 Btu/h',
    limits: { ...CASSETTE_LIMITS, min_ceiling_opening: '36 in', max_ceiling_opening: '38 in' },
  },
  { name: 'Wall unit 09', modelNumber: 'WM-09', unitKind: 'wall_mounted', capacity: '9000 Btu/h', limits: WALL_LIMITS },
  { name: 'Wall unit 12', modelNumber: 'WM-12', unitKind: 'wall_mounted', capacity: '12000 Btu/h', limits: WALL_LIMITS },
  {
    name: 'Ducted low static 24',
    modelNumber: 'DL-24',
    unitKind: 'ducted_low',
    capacity: '24000 Btu/h',
    mountPosition: 'ceiling',
    // The three ducted kinds differ in their rated external static pressure range.
    limits: { ...DUCTED_LIMITS, min_external_static: '0.1 in. w.c.', max_external_static: '0.4 in. w.c.' },
  },
  {
    name: 'Ducted high static 36',
    modelNumber: 'DH-36',
    unitKind: 'ducted_high',
    capacity: '3 tons',
    mountPosition: 'ceiling',
    limits: { ...DUCTED_LIMITS, min_external_static: '0.2 in. w.c.', max_external_static: '0.8 in. w.c.' },
  },
  {
    name: 'Ducted very high static 48',
    modelNumber: 'DV-48',
    unitKind: 'ducted_very_high',
    capacity: '4 tons',
    mountPosition: 'ceiling',
    limits: { ...DUCTED_LIMITS, min_external_static: '0.4 in. w.c.', max_external_static: '1.2 in. w.c.' },
  },
  {
    name: 'Floor console 12',
    modelNumber: 'FC-12',
    unitKind: 'floor_console',
    capacity: '12000 Btu/h',
    limits: { max_level_deviation: '1/8 in', min_clearance_side: '4 in', min_clearance_below: '4 in', max_accessory_pump_lift: '6 ft', min_pipe_hole_slope: '1/4 in/ft' },
  },
  {
    name: 'Floor/ceiling 18',
    modelNumber: 'FF-18',
    unitKind: 'floor_ceiling',
    capacity: '18000 Btu/h',
    limits: { max_level_deviation: '1/4 in', min_clearance_side: '4 in', min_distance_to_wall: '1 ft', max_accessory_pump_lift: '6 ft', min_pipe_hole_slope: '1/4 in/ft' },
  },
  {
    name: 'Air-handler coil kit 60',
    modelNumber: 'AK-60',
    unitKind: 'ahu_coil_kit',
    capacity: '5 tons',
    limits: { max_valve_kit_pipe_length: '6 ft', min_clearance_front: '2 ft', max_sensor_angle: '45°', min_coil_internal_volume: '1 L', max_coil_internal_volume: '4 L' },
    mountPosition: 'floor',
  },
];

/** The quantity each model limit is stated in (the one list in shared/catalogue/types.ts). */
const MODEL_QUANTITY = Object.fromEntries(MODEL_LIMITS.map((m) => [m.key, m.quantity])) as Record<ModelLimitKey, QuantityKind>;

interface SystemSpec {
  name: string;
  outdoorModel: string;
  refrigerant: Refrigerant;
  factory: string;
  field: string;
}

export const DEMO_SYSTEMS: SystemSpec[] = [
  { name: 'VRF-1', outdoorModel: 'OU-H10 (invented)', refrigerant: 'R-410A', factory: '28 lb', field: '8 lb' },
  { name: 'VRF-2', outdoorModel: 'OU-H12 (invented)', refrigerant: 'R-410A', factory: '30 lb', field: '9 lb 4 oz' },
  { name: 'VRF-3', outdoorModel: 'OU-H12 (invented)', refrigerant: 'R-410A', factory: '26 lb', field: '12 lb' },
  { name: 'VRF-4', outdoorModel: 'OU-H10 (invented)', refrigerant: 'R-410A', factory: '28 lb', field: '7 lb 8 oz' },
  { name: 'VRF-5', outdoorModel: 'OU-H10 (invented)', refrigerant: 'R-410A', factory: '28 lb', field: '6 lb 12 oz' },
  { name: 'VRF-6', outdoorModel: 'OU-H08 (invented)', refrigerant: 'R-410A', factory: '24 lb', field: '5 lb' },
  { name: 'VRF-7', outdoorModel: 'OU-H14 (invented)', refrigerant: 'R-410A', factory: '32 lb', field: '10 lb' },
  { name: 'VRF-8', outdoorModel: 'OU-M05 (invented)', refrigerant: 'R-32', factory: '4.2 kg', field: '0.8 kg' },
];

interface SpaceSpec {
  name: string;
  /** width × depth × ceiling height, ft */
  ft: [number, number, number];
  enclosed?: boolean;
  units: Array<{ kind: UnitKindKey; model: string }>;
  system: string;
}

const CASSETTE = { kind: 'cassette_4way', model: 'TC4-18' } as const;
const COMPACT = { kind: 'cassette_compact', model: 'CC4-12' } as const;
const WALL9 = { kind: 'wall_mounted', model: 'WM-09' } as const;
const WALL12 = { kind: 'wall_mounted', model: 'WM-12' } as const;
const DUCTED = { kind: 'ducted_low', model: 'DL-24' } as const;

function apartments(level: number, count: number, system: (n: number) => string, r32 = false): SpaceSpec[] {
  return Array.from({ length: count }, (_, i) => ({
    name: `Apartment ${level}0${i + 1}`,
    ft: [28, 25, 9] as [number, number, number],
    system: system(i + 1),
    units: r32 && system(i + 1) === 'VRF-8' ? [WALL9, WALL12, COMPACT] : [DUCTED, WALL9, WALL12],
  }));
}

/** Levels (in order) and their spaces, each with the units that serve it. */
export function demoLevels(): Array<{ name: string; spaces: SpaceSpec[] }> {
  const levels: Array<{ name: string; spaces: SpaceSpec[] }> = [
    {
      name: 'Level 1',
      spaces: [
        { name: 'Lobby', ft: [40, 30, 14], system: 'VRF-1', units: [{ kind: 'floor_console', model: 'FC-12' }, { kind: 'floor_console', model: 'FC-12' }, { kind: 'floor_ceiling', model: 'FF-18' }] },
        { name: 'Corridor 1', ft: [120, 8, 9], system: 'VRF-1', units: [CASSETTE, CASSETTE, CASSETTE] },
        { name: 'Telecom room 1-01', ft: [12, 14, 10], system: 'VRF-1', units: [WALL12] },
        { name: 'Management office', ft: [20, 15, 9], system: 'VRF-1', units: [COMPACT] },
        {
          name: 'Retail A',
          ft: [50, 40, 12],
          system: 'VRF-7',
          units: [{ kind: 'ducted_high', model: 'DH-36' }, { kind: 'ducted_high', model: 'DH-36' }, { kind: 'ahu_coil_kit', model: 'AK-60' }, CASSETTE, CASSETTE],
        },
        {
          name: 'Retail B',
          ft: [45, 40, 12],
          system: 'VRF-7',
          units: [{ kind: 'cassette_2way', model: 'TC2-24' }, { kind: 'cassette_2way', model: 'TC2-24' }, { kind: 'ducted_very_high', model: 'DV-48' }],
        },
      ],
    },
  ];
  for (const n of [2, 3, 4, 5, 6]) {
    const system = n === 6 ? (apt: number) => (apt <= 2 ? 'VRF-8' : 'VRF-6') : () => `VRF-${n}`;
    const levelSystem = `VRF-${n}`;
    const spaces: SpaceSpec[] = [
      { name: `Corridor ${n}`, ft: [120, 6, 9], system: levelSystem, units: [CASSETTE, CASSETTE, CASSETTE] },
      ...apartments(n, 5, system, n === 6),
    ];
    if (n === 2 || n === 3) {
      spaces.push({ name: `Office ${n}-10`, ft: [20, 15, 9], system: levelSystem, units: [COMPACT] });
      spaces.push({ name: `Office ${n}-11`, ft: [18, 14, 9], system: levelSystem, units: [COMPACT] });
    }
    // The small office that makes VRF-3 fail its concentration check.
    if (n === 3) spaces.push({ name: 'Office 3-12', ft: [10, 10, 8], system: 'VRF-3', units: [WALL9] });
    if (n >= 4) spaces.push({ name: `Amenity room ${n}-06`, ft: [30, 24, 10], system: levelSystem, units: [CASSETTE, CASSETTE] });
    levels.push({ name: `Level ${n}`, spaces });
  }
  levels.push({ name: 'Roof', spaces: [{ name: 'Roof plant area', ft: [60, 40, 12], enclosed: false, system: 'VRF-1', units: [] }] });
  return levels;
}

const FT2 = toBase(1, 'ft²');
const FT = toBase(1, 'ft');

/** Companies on the demo job; catalogue; and, the first time, the job's levels to units. */
export async function seedDemoSetup(
  db: Database,
  jobs: { main: string; others: string[] },
  companies: Record<CompanyKey, string>,
  transaction: Transaction,
): Promise<boolean> {
  const { JobCompany, Level, Space, SpaceLink, System, UnitModel, Unit } = db.models;
  let created = false;

  for (const jobId of [jobs.main, ...jobs.others]) {
    const keys: CompanyKey[] = jobId === jobs.main ? ['gc', 'inspection', 'mechanical', 'electrical', 'ceilings'] : ['gc', 'inspection'];
    for (const key of keys) {
      const [, made] = await JobCompany.findOrCreate({
        where: { jobId, companyId: companies[key] },
        defaults: { jobId, companyId: companies[key], trades: DEMO_COMPANY_TRADES[key] },
        transaction,
      });
      created ||= made;
    }
    created = (await copyBuiltinCatalogue(jobId, transaction)) > 0 || created;
  }

  const jobId = jobs.main;
  if ((await Level.count({ where: { jobId }, transaction })) > 0) return created;

  const models = new Map<string, string>();
  for (const m of DEMO_MODELS) {
    const limits: Partial<Record<ModelLimitKey, StatedLimitDto>> = {};
    for (const [key, text] of Object.entries(m.limits) as [ModelLimitKey, string][]) {
      limits[key] = statedLimit({ value: text, source: inventedSource(m.modelNumber, 4) }, MODEL_QUANTITY[key], key);
    }
    const [value, unit] = m.capacity.split(' ') as [string, string];
    const model = await UnitModel.create(
      { jobId, name: m.name, modelNumber: m.modelNumber, unitKind: m.unitKind, nominalCapacity: toBase(Number(value), unit), limits, mountPosition: m.mountPosition ?? null },
      { transaction },
    );
    models.set(m.modelNumber, model.id);
  }

  const systems = new Map<string, string>();
  const mass = (text: string) =>
    text
      .split(/\s+(?=\d)/)
      .map((part) => {
        const [v, u] = part.split(' ') as [string, string];
        return toBase(Number(v), u);
      })
      .reduce((a, b) => a + b, 0);
  for (const s of DEMO_SYSTEMS) {
    const system = await System.create(
      {
        jobId,
        name: s.name,
        outdoorModel: s.outdoorModel,
        refrigerant: s.refrigerant,
        factoryCharge: mass(s.factory),
        fieldCharge: mass(s.field),
        concentrationLimitOverride: null,
      },
      { transaction },
    );
    systems.set(s.name, system.id);
  }

  const spaceIds = new Map<string, string>();
  for (const [index, levelSpec] of demoLevels().entries()) {
    const level = await Level.create({ jobId, name: levelSpec.name, position: index + 1 }, { transaction });
    const levelNumber = index + 1;
    let unitNumber = 0;
    for (const s of levelSpec.spaces) {
      const [w, d, h] = s.ft;
      const space = await Space.create(
        { jobId, levelId: level.id, name: s.name, floorArea: w * d * FT2, ceilingHeight: h * FT, enclosed: s.enclosed ?? true },
        { transaction },
      );
      spaceIds.set(s.name, space.id);
      for (const u of s.units) {
        unitNumber += 1;
        const model = DEMO_MODELS.find((m) => m.modelNumber === u.model)!;
        const [value, unit] = model.capacity.split(' ') as [string, string];
        await Unit.create(
          {
            jobId,
            tag: `IU-L${levelNumber}-${String(unitNumber).padStart(2, '0')}`,
            kind: u.kind,
            modelId: models.get(u.model)!,
            capacity: toBase(Number(value), unit),
            levelId: level.id,
            spaceId: space.id,
            systemId: systems.get(s.system)!,
          },
          { transaction },
        );
      }
    }
  }
  // A permanent opening: the lobby and the ground-floor corridor count as one volume.
  const [a, b] = [spaceIds.get('Lobby')!, spaceIds.get('Corridor 1')!].sort() as [string, string];
  await SpaceLink.create({ jobId, spaceAId: a, spaceBId: b }, { transaction });
  return true;
}
