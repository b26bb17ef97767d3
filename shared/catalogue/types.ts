/**
 * The contract between the defect catalogue (data) and the measured-rule engine (shared/calc).
 * A catalogue item may carry a measured rule; the rule names where its limit comes from:
 * the unit's model (limits entered from the installation manual), a code value built into
 * Trimout (shared/calc/limits.ts, each with document, edition and section), or a job setting.
 */
import type { Severity, TradeKey, UnitKindKey } from '../words';

/** Physical quantities the engine parses and compares. */
export const QUANTITY_KINDS = [
  'length', // heights, clearances, runs, drops, distances
  'slope', // drop per run (stored as a ratio, rise/run)
  'area',
  'volume',
  'mass', // refrigerant charge
  'capacity', // cooling capacity
  'angle',
  'pressure', // duct external static pressure (Pa; in. w.c. typed)
  'boolean', // yes/no observations
] as const;
export type QuantityKind = (typeof QUANTITY_KINDS)[number];

export const COMPARISONS = ['at_least', 'at_most', 'between', 'equal_within', 'yes_no'] as const;
export type Comparison = (typeof COMPARISONS)[number];

/**
 * Per-model limits a GC manager enters from an installation manual. The key is stable;
 * each model row stores the value, the unit it is stated in, and a note of where it came from.
 */
export const MODEL_LIMITS = [
  { key: 'max_pump_lift', label: 'Maximum condensate pump lift', quantity: 'length' },
  { key: 'max_drain_horizontal_run', label: 'Maximum horizontal drain run from the unit', quantity: 'length' },
  { key: 'min_clearance_top', label: 'Minimum clearance above the unit', quantity: 'length' },
  { key: 'min_clearance_side', label: 'Minimum clearance at each side', quantity: 'length' },
  { key: 'min_clearance_front', label: 'Minimum clearance in front (service side)', quantity: 'length' },
  { key: 'min_clearance_below', label: 'Minimum clearance below the unit', quantity: 'length' },
  { key: 'min_distance_to_wall', label: 'Minimum distance from unit to wall or obstruction', quantity: 'length' },
  { key: 'min_mount_height', label: 'Minimum mounting height above the floor', quantity: 'length' },
  { key: 'max_valve_kit_pipe_length', label: 'Maximum pipe length from expansion-valve kit to coil', quantity: 'length' },
  { key: 'max_sensor_angle', label: 'Maximum coil-sensor angle from the pipe centre line', quantity: 'angle' },
  { key: 'max_level_deviation', label: 'Maximum deviation from level across the unit', quantity: 'length' },
  { key: 'min_pipe_hole_slope', label: 'Minimum fall of the wall pipe hole to the outside', quantity: 'slope' },
  { key: 'max_accessory_pump_lift', label: 'Maximum lift of the accessory condensate pump', quantity: 'length' },
  { key: 'min_body_to_ceiling', label: 'Minimum height of the cassette body above the ceiling', quantity: 'length' },
  { key: 'max_body_to_ceiling', label: 'Maximum height of the cassette body above the ceiling', quantity: 'length' },
  { key: 'min_ceiling_opening', label: 'Smallest ceiling opening side for the cassette', quantity: 'length' },
  { key: 'max_ceiling_opening', label: 'Largest ceiling opening side for the cassette', quantity: 'length' },
  { key: 'min_coil_internal_volume', label: 'Smallest coil internal volume the coil kit controls', quantity: 'volume' },
  { key: 'max_coil_internal_volume', label: 'Largest coil internal volume the coil kit controls', quantity: 'volume' },
  { key: 'min_external_static', label: 'Lowest rated external static pressure', quantity: 'pressure' },
  { key: 'max_external_static', label: 'Highest rated external static pressure', quantity: 'pressure' },
] as const;
export type ModelLimitKey = (typeof MODEL_LIMITS)[number]['key'];

/** Job settings a measured rule may read its limit from. */
export const JOB_SETTINGS = [
  { key: 'min_drain_slope', label: 'Minimum condensate drain slope (job setting)', quantity: 'slope' },
  { key: 'max_drain_support_spacing', label: 'Maximum span between condensate drain supports (job setting)', quantity: 'length' },
] as const;
export type JobSettingKey = (typeof JOB_SETTINGS)[number]['key'];

export type LimitRef =
  | { from: 'model'; key: ModelLimitKey }
  | { from: 'code'; key: string } // a key of CODE_LIMITS in shared/calc/limits.ts
  | { from: 'job'; key: JobSettingKey };

export interface MeasuredRule {
  /** What the inspector measures, in plain words: "Pump lift from the unit's base". */
  measure: string;
  quantity: QuantityKind;
  comparison: Comparison;
  /** at_least / at_most / equal_within: the limit. between: the lower bound. */
  limit?: LimitRef;
  /** between: the upper bound. */
  upper?: LimitRef;
  /** equal_within: allowed deviation, same quantity, in base units (see shared/calc/quantity.ts). */
  tolerance?: number;
  /** yes_no: the answer that passes. */
  expected?: boolean;
  /**
   * A code calculation in shared/calc that decides the rule and names its source with the job's
   * edition (IMC 307.2.4.1 for a ductless drain's check valve or trap; IMC Table 307.2.2 for a
   * drain's size from the capacity it carries …): CODE_CHECK_RULES gives each one's shape.
   */
  codeCheck?: CodeCheckKey;
}

/** Code calculations a rule may be decided by (shared/calc/itemRules.ts evaluateItemRule). */
export const CODE_CHECKS = [
  'ductless_check_valve_or_trap',
  'drain_pipe_size',
  'aux_pan_depth',
  'aux_pan_oversize',
  'working_space_depth',
  'working_space_width',
  'attic_opening',
  'pipe_support_spacing',
  'drain_support_spacing',
] as const;
export type CodeCheckKey = (typeof CODE_CHECKS)[number];

/**
 * The rule shape each code calculation decides: what is measured and how it is compared. The
 * calculation supplies the limit (a numeric rule that names one needs no `limit` of its own).
 * `given`: the measured text may add, after "for", what the calculation needs to know
 * ("1-1/4 in for 24 tons": the capacity a manifolded drain carries; "5 ft for 1-5/8 in OD": the tube size).
 */
export const CODE_CHECK_RULES: Record<CodeCheckKey, { quantity: QuantityKind; comparison: Comparison; given?: 'capacity' | 'pipe' }> = {
  ductless_check_valve_or_trap: { quantity: 'boolean', comparison: 'yes_no' },
  drain_pipe_size: { quantity: 'length', comparison: 'at_least', given: 'capacity' },
  aux_pan_depth: { quantity: 'length', comparison: 'at_least' },
  aux_pan_oversize: { quantity: 'length', comparison: 'at_least' },
  working_space_depth: { quantity: 'length', comparison: 'at_least' },
  working_space_width: { quantity: 'length', comparison: 'at_least' },
  attic_opening: { quantity: 'length', comparison: 'at_least' },
  pipe_support_spacing: { quantity: 'length', comparison: 'at_most', given: 'pipe' },
  drain_support_spacing: { quantity: 'length', comparison: 'at_most', given: 'pipe' },
};

export interface CatalogueItem {
  /** Our own scheme: a group prefix and a number, e.g. "DR-03" (drainage, third). */
  code: string;
  group: CatalogueGroup;
  title: string;
  description: string;
  unitKinds: readonly UnitKindKey[];
  defaultSeverity: Severity;
  trade: TradeKey;
  measuredRule?: MeasuredRule;
  fixGuidance: string;
  /** Shown where the work is hazardous (electrical, refrigerant, brazing, lifting, overhead). */
  caution?: string;
  /** The fix needs access above the ceiling: a level cannot close its ceilings while one is open. */
  needsCeilingAccess: boolean;
}

export const CATALOGUE_GROUPS = [
  { key: 'mounting', prefix: 'MT', label: 'Mounting and hanging' },
  { key: 'clearance', prefix: 'CL', label: 'Clearances and access' },
  { key: 'drainage', prefix: 'DR', label: 'Condensate drainage' },
  { key: 'penetrations', prefix: 'PN', label: 'Wall and roof penetrations' },
  { key: 'panels', prefix: 'PG', label: 'Panels, grilles and gaskets' },
  { key: 'wiring', prefix: 'EL', label: 'Wiring, harnesses and terminals' },
  { key: 'sensors', prefix: 'SN', label: 'Sensors' },
  { key: 'piping', prefix: 'RP', label: 'Refrigerant piping' },
  { key: 'controls', prefix: 'CT', label: 'Controls and addressing' },
  { key: 'labelling', prefix: 'LB', label: 'Labelling' },
] as const;
export type CatalogueGroup = (typeof CATALOGUE_GROUPS)[number]['key'];

// ---------------------------------------------------------------------------------------------
// Added for the measured-rule engine (shared/calc). Additions only; nothing above is renamed.
// ---------------------------------------------------------------------------------------------

/** The unit system a job displays quantities in. Values are always stored in base units. */
export const UNIT_SYSTEMS = ['imperial', 'metric'] as const;
export type UnitSystem = (typeof UNIT_SYSTEMS)[number];

/**
 * A limit as a person entered it: from a model's installation manual or as a job setting.
 * `unit` is the unit it is stated in (e.g. "in", "mm", "in/ft", "%", "deg"); shared/calc converts.
 */
export interface StatedLimit {
  value: number;
  unit: string;
  /** Where it came from, e.g. "installation manual, p. 12". */
  source?: string;
}

/** A limit resolved for one unit of one job, ready for the engine. */
export interface ResolvedLimit {
  /** In base units (shared/calc/quantity.ts). */
  value: number;
  quantity: QuantityKind;
  /** e.g. "Model VX-24 installation manual, p. 12", "IMC 2018 Table 307.2.2", "Job setting: ...". */
  source: string;
}

/** Codes and standards whose limits are built into shared/calc/limits.ts. */
export const CODE_DOCUMENTS = ['IMC', 'IRC', 'NFPA 70', 'ASHRAE 34', 'IEC 60335-2-40'] as const;
export type CodeDocument = (typeof CODE_DOCUMENTS)[number];

/** The edition a job uses for each code document, e.g. { IMC: '2018', 'ASHRAE 34': '2019' }. */
export type EditionChoice = Partial<Record<CodeDocument, string>>;
