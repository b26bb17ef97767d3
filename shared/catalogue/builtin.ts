/**
 * Trimout's built-in defect catalogue: the defect types a new job starts with.
 *
 * Written in our own plain words for ductless and VRF indoor units. Codes follow our own
 * scheme: the group's prefix from CATALOGUE_GROUPS and a two-digit number ("DR-03").
 * Codes are stable once published: findings refer to them, so retire an item rather than
 * renumber it.
 *
 * Measured rules name where their limit comes from: the unit's model (entered by the GC
 * manager from the installation manual), a code value (keys owned by shared/calc/limits.ts)
 * or a job setting. The catalogue never states a limit's number itself.
 *
 * needsCeilingAccess is true when the usual fix means working above the ceiling (hangers,
 * drain and refrigerant piping, cable routes). Work done through the unit's own grille or
 * its access panel does not count.
 */
import type { UnitKindKey } from '../words';
import type { CatalogueItem } from './types';
import { GOVERNS } from '../deferral';

// ---------------------------------------------------------------------------------------------
// Unit-kind sets (kinds are data; each item lists exactly the kinds the check applies to)
// ---------------------------------------------------------------------------------------------

const CASSETTES: readonly UnitKindKey[] = ['cassette_4way', 'cassette_2way', 'cassette_compact'];
/** Cassettes that blow four ways: an outlet may be blanked off, which needs a setting changed. */
const FOUR_WAY: readonly UnitKindKey[] = ['cassette_4way', 'cassette_compact'];
const DUCTED: readonly UnitKindKey[] = ['ducted_low', 'ducted_high', 'ducted_very_high'];
/** Ductless kinds: the drain rule for ductless mini-splits (check valve or trap) applies to them. */
const DUCTLESS: readonly UnitKindKey[] = [...CASSETTES, 'wall_mounted', 'floor_console', 'floor_ceiling'];
const ALL_KINDS: readonly UnitKindKey[] = [...DUCTLESS, ...DUCTED, 'ahu_coil_kit'];
/**
 * Kinds that hang from the structure on rods: cassettes, ducted units, and a floor/ceiling unit
 * when it is ceiling-hung (standing on the floor, its rod checks are not applicable). Not the
 * coil kit (it sits on its air handler, on a platform or the floor) nor the floor console.
 */
const HUNG: readonly UnitKindKey[] = [...CASSETTES, 'floor_ceiling', ...DUCTED];
/** Kinds fixed to a wall or standing on the floor. */
const WALL_OR_FLOOR: readonly UnitKindKey[] = ['wall_mounted', 'floor_console', 'floor_ceiling'];
/** Floor-standing kinds (a floor/ceiling unit may also stand on the floor). */
const FLOOR_UNITS: readonly UnitKindKey[] = ['floor_console', 'floor_ceiling'];
/** Kinds hidden in a ceiling space, attic or closet and reached through an access opening. */
const CONCEALED: readonly UnitKindKey[] = [...DUCTED, 'ahu_coil_kit'];
/** Kinds with a built-in condensate pump (or a pump kit the manual rates) and its float switch. */
const PUMPED: readonly UnitKindKey[] = [...CASSETTES, ...DUCTED];
/** Kinds that take an accessory condensate pump where the drain cannot fall away by gravity. */
const ACCESSORY_PUMPED: readonly UnitKindKey[] = ['wall_mounted', 'floor_console', 'floor_ceiling'];
/** Kinds that may sit above a ceiling used as a return-air plenum. */
const IN_PLENUM: readonly UnitKindKey[] = [...CASSETTES, ...DUCTED, 'ahu_coil_kit'];

// ---------------------------------------------------------------------------------------------
// Cautions: every caution ends by deferring to the manual, the codes and licensed practice
// ---------------------------------------------------------------------------------------------

type Hazard =
  | 'electrical'
  | 'refrigerant'
  | 'brazing'
  | 'pressure'
  | 'lifting'
  | 'overhead'
  | 'drilling'
  | 'attic'
  | 'fan';

const HAZARD_TEXT: Record<Hazard | 'a2l' | 'nitrogen', string> = {
  electrical:
    "Electrical work: isolate and lock out the supply, and prove it dead, before opening the unit's electrical box or its disconnect.",
  refrigerant:
    'Refrigerant work: only certified technicians open the circuit; recover the charge, never vent it, and wear eye and hand protection.',
  a2l:
    'Flammable (A2L) refrigerants such as R-32 and R-454B: keep ignition sources away from the work, use recovery machines, vacuum pumps and detectors rated for A2L refrigerants, ventilate the space, and leak-check the joints before the unit runs.',
  brazing:
    'Hot work: braze with nitrogen flowing through the pipe, under a hot-work permit where the site requires one, with a fire watch and an extinguisher at hand.',
  pressure:
    'Pressure testing: use a regulator on the nitrogen cylinder, never go above the test pressure the manual sets, and keep people clear of joints under test.',
  nitrogen:
    'Nitrogen displaces oxygen: in a closet, attic, shaft or other enclosed space keep it ventilated, vent the purge outside the space, and use an oxygen monitor where the site requires one.',
  lifting:
    "Lifting: take the unit's weight on a lift or with enough people before loosening a hanger nut or lifting it off its fixings.",
  overhead:
    'Overhead work: use a rated ladder or lift, keep the area below clear, and wear head and eye protection.',
  drilling:
    'Drilling an outside wall: find live cables, gas and water lines in and behind the wall with drawings and a detector before drilling, and hold the drill by its insulated grips.',
  attic:
    'Attic work: step only on framing or a walkway, watch for heat, roofing nails and exposed wiring, and keep the way out clear.',
  fan: 'Rotating fans: isolate the unit before reaching past a filter, grille or panel; under automatic control a fan can start on its own.',
};


/**
 * The caution for the hazards named. Opening the circuit brings the flammable-refrigerant text
 * (a job's systems may use an A2L refrigerant); brazing and pressure testing bring the nitrogen
 * text (both fill the pipe with nitrogen, which can collect in an enclosed space).
 */
function caution(...hazards: Hazard[]): string {
  const texts: string[] = [];
  for (const h of hazards) {
    texts.push(HAZARD_TEXT[h]);
    if (h === 'refrigerant') texts.push(HAZARD_TEXT.a2l);
  }
  if (hazards.includes('brazing') || hazards.includes('pressure')) texts.push(HAZARD_TEXT.nitrogen);
  return [...texts, GOVERNS].join(' ');
}

/** Moving a unit: pipework cut and rebrazed, pressure-tested, rewired and the unit lifted. */
const RELOCATE: Hazard[] = ['refrigerant', 'brazing', 'pressure', 'electrical', 'lifting'];

// ---------------------------------------------------------------------------------------------
// The catalogue
// ---------------------------------------------------------------------------------------------

/**
 * One item per ducted kind: the external static pressure measured across the unit, judged against
 * the model's rated range (what sets the low, high and very high static kinds apart).
 */
function staticRangeItem(code: string, kind: UnitKindKey, range: 'low' | 'high' | 'very high'): CatalogueItem {
  return {
    code,
    group: 'controls',
    title: `Static pressure outside the ${range} static range`,
    description: `The external static pressure measured across the ${range}-static ducted unit is outside the range the model is rated for, or does not match the static pressure setting chosen for the duct design, so airflow is short and the coil may freeze or the fan overload.`,
    unitKinds: [kind],
    defaultSeverity: 'major',
    trade: 'mechanical',
    measuredRule: {
      measure: 'External static pressure measured across the unit (supply less return, as the manual shows)',
      quantity: 'pressure',
      comparison: 'between',
      limit: { from: 'model', key: 'min_external_static' },
      upper: { from: 'model', key: 'max_external_static' },
    },
    fixGuidance:
      "Measure the static pressure at the unit's supply and return as the manual shows, set the static pressure setting the duct design calls for, and where the reading stays outside the model's range, rework the ductwork.",
    caution: caution('electrical', 'fan', 'overhead'),
    needsCeilingAccess: true,
  };
}

const ITEMS: CatalogueItem[] = [
  // ---- Mounting and hanging (MT) -----------------------------------------------------------
  {
    code: 'MT-01',
    group: 'mounting',
    title: 'Not hung on threaded rod',
    description:
      'The unit hangs from chain, wire, perforated strap or another makeshift hanger instead of threaded rod at every hanger bracket.',
    unitKinds: HUNG,
    defaultSeverity: 'critical',
    trade: 'mechanical',
    fixGuidance:
      'Hang the unit on threaded rod of the size the manual calls for, one rod at every hanger bracket, fixed to structure, with a washer and nut above and below each bracket.',
    caution: caution('lifting', 'overhead'),
    needsCeilingAccess: true,
  },
  {
    code: 'MT-02',
    group: 'mounting',
    title: 'Nut or washer missing at a hanger',
    description:
      'A hanger bracket is held by a single nut, or a washer is missing above or below the bracket, so the bracket can slip or the nut can back off.',
    unitKinds: HUNG,
    defaultSeverity: 'critical',
    trade: 'mechanical',
    fixGuidance:
      'Fit a washer and a nut above and below every bracket and tighten the pair against the bracket so it cannot move on the rod, with a few threads of rod showing below the lower nut.',
    caution: caution('lifting', 'overhead'),
    needsCeilingAccess: true,
  },
  {
    code: 'MT-03',
    group: 'mounting',
    title: 'Hanger not fixed to structure',
    description:
      "A hanger rod is fixed to the ceiling grid, a duct, a pipe or another trade's support instead of to the building structure, or its anchor is not rated for the load.",
    unitKinds: HUNG,
    defaultSeverity: 'critical',
    trade: 'mechanical',
    fixGuidance:
      "Fix each rod to structure with an anchor or beam clamp rated for the unit's weight. Where structure is out of reach, add a trapeze or strut frame designed for the load.",
    caution: caution('lifting', 'overhead'),
    needsCeilingAccess: true,
  },
  {
    code: 'MT-04',
    group: 'mounting',
    title: 'Sway bracing missing',
    description:
      "Where the project's design calls for seismic or lateral restraint, the unit has no bracing or only part of it, so it can swing and tear its piping and drain loose.",
    unitKinds: HUNG,
    defaultSeverity: 'critical',
    trade: 'mechanical',
    fixGuidance:
      "Install the bracing shown in the project's restraint details, at the points and angles shown, and have the designer accept any change from the details.",
    caution: caution('overhead'),
    needsCeilingAccess: true,
  },
  {
    code: 'MT-05',
    group: 'mounting',
    title: 'Hung unit not level',
    description:
      'The unit hangs further out of level than the model allows, or tilts away from its drain outlet, so water pools in the wrong end of the drain pan.',
    unitKinds: HUNG,
    defaultSeverity: 'major',
    trade: 'mechanical',
    measuredRule: {
      measure: 'Difference in height from one end of the unit to the other',
      quantity: 'length',
      comparison: 'at_most',
      limit: { from: 'model', key: 'max_level_deviation' },
    },
    fixGuidance:
      'Adjust the hanger nuts until the unit is level within the limit (or falls toward the drain outlet only where the manual says so), check with a level on the unit body, then lock the nuts.',
    caution: caution('lifting', 'overhead'),
    needsCeilingAccess: true,
  },
  {
    code: 'MT-06',
    group: 'mounting',
    title: 'Wall or floor unit loose or not level',
    description:
      'The mounting plate, brackets or floor fixings move when the unit is pushed, use too few fixings, or hold the unit further out of level than the model allows.',
    unitKinds: WALL_OR_FLOOR,
    defaultSeverity: 'critical',
    trade: 'mechanical',
    measuredRule: {
      measure: 'Difference in height from one side of the unit to the other',
      quantity: 'length',
      comparison: 'at_most',
      limit: { from: 'model', key: 'max_level_deviation' },
    },
    fixGuidance:
      "Refix the plate or brackets level, into studs, blocking or anchors rated for the unit's weight, using every fixing point the manual shows; then rehang the unit and check it sits firmly.",
    caution: caution('lifting', 'electrical'),
    needsCeilingAccess: false,
  },
  {
    code: 'MT-07',
    group: 'mounting',
    title: 'Unit mounted too low',
    description:
      "The wall unit is closer to the floor than the model's minimum mounting height, putting moving louvres and air outlets within reach and spoiling the air throw. (A floor-standing unit has no minimum mounting height.)",
    unitKinds: ['wall_mounted'],
    defaultSeverity: 'major',
    trade: 'mechanical',
    measuredRule: {
      measure: 'Height from the finished floor to the underside of the unit',
      quantity: 'length',
      comparison: 'at_least',
      limit: { from: 'model', key: 'min_mount_height' },
    },
    fixGuidance:
      'Raise the unit to at least the minimum height, keeping the clearance it needs above it, reroute piping, drain and cable to suit, and recheck the drain fall afterwards.',
    caution: caution(...RELOCATE),
    needsCeilingAccess: false,
  },
  {
    code: 'MT-08',
    group: 'mounting',
    title: 'Wall unit not latched on its plate',
    description:
      "The wall unit is hooked over the top of its mounting plate but its bottom edge is not clipped onto the plate's latches, or the bottom fixing screws the manual shows are missing, so the unit can be lifted or knocked off the plate.",
    unitKinds: ['wall_mounted'],
    defaultSeverity: 'critical',
    trade: 'mechanical',
    fixGuidance:
      'Press the bottom of the unit onto the plate until both latches click, fit the bottom fixing screws the manual shows, and check the unit cannot be lifted off by hand.',
    caution: caution('lifting', 'electrical'),
    needsCeilingAccess: false,
  },
  {
    code: 'MT-09',
    group: 'mounting',
    title: 'Coil kit fixing points not all used',
    description:
      "The coil kit is not fixed to its air handler or cabinet at every point the kit's manual shows: screws, brackets or rails are missing, so the coil can shift, strain its piping and leak air around the coil.",
    unitKinds: ['ahu_coil_kit'],
    defaultSeverity: 'major',
    trade: 'mechanical',
    fixGuidance:
      "Fit every screw, bracket and rail the kit's manual shows, with the coil seated square in the cabinet, and seal the gaps the manual names so air cannot bypass the coil.",
    caution: caution('lifting', 'electrical'),
    needsCeilingAccess: false,
  },
  {
    code: 'MT-10',
    group: 'mounting',
    title: 'Duct connection not sealed or supported',
    description:
      "A supply or return duct joins the ducted unit with open or untaped seams, or hangs its weight on the unit's flanges instead of its own supports, so air leaks into the ceiling and the flanges bend.",
    unitKinds: DUCTED,
    defaultSeverity: 'major',
    trade: 'mechanical',
    fixGuidance:
      'Seal each duct connection with the sealant, tape or gasket the design specifies, fit a flexible connector where the manual or design shows one, and carry the duct on its own hangers so the unit takes no duct weight.',
    caution: caution('overhead', 'attic'),
    needsCeilingAccess: true,
  },

  // ---- Clearances and access (CL) ----------------------------------------------------------
  {
    code: 'CL-01',
    group: 'clearance',
    title: 'Too little space above',
    description:
      "The gap above a wall-mounted unit is less than the model's minimum: the unit draws its air in across the top, so airflow suffers and the unit cannot be lifted off its plate for service.",
    unitKinds: ['wall_mounted'],
    defaultSeverity: 'major',
    trade: 'mechanical',
    measuredRule: {
      measure: 'Gap from the top of the unit to the ceiling or nearest obstruction',
      quantity: 'length',
      comparison: 'at_least',
      limit: { from: 'model', key: 'min_clearance_top' },
    },
    fixGuidance:
      'Lower the unit (still at or above its minimum mounting height) or remove the obstruction, then recheck the drain fall from the new position.',
    caution: caution(...RELOCATE),
    needsCeilingAccess: false,
  },
  {
    code: 'CL-02',
    group: 'clearance',
    title: 'Too little space at the sides',
    description:
      'A wall, cabinet or fitting is closer to the side of the unit than the model allows, blocking airflow, the side covers or the piping connections.',
    unitKinds: WALL_OR_FLOOR,
    defaultSeverity: 'major',
    trade: 'mechanical',
    measuredRule: {
      measure: 'Gap from each side of the unit to the nearest wall or obstruction (the smaller one)',
      quantity: 'length',
      comparison: 'at_least',
      limit: { from: 'model', key: 'min_clearance_side' },
    },
    fixGuidance:
      'Move the obstruction, or move the unit, until each side has at least the minimum gap.',
    caution: caution(...RELOCATE),
    needsCeilingAccess: false,
  },
  {
    code: 'CL-03',
    group: 'clearance',
    title: 'Too close to a wall',
    description:
      'The unit sits closer to a wall, bulkhead or tall fitting than the model allows, so its air blows onto the wall and comes straight back into the return.',
    unitKinds: [...CASSETTES, 'floor_ceiling'],
    defaultSeverity: 'major',
    trade: 'mechanical',
    measuredRule: {
      measure: "Distance from the unit's edge to the nearest wall or full-height obstruction",
      quantity: 'length',
      comparison: 'at_least',
      limit: { from: 'model', key: 'min_distance_to_wall' },
    },
    fixGuidance:
      "Relocate the unit; or, where the design accepts it, close off the outlet facing the wall with the maker's blanking kit and make the matching setting.",
    caution: caution(...RELOCATE, 'overhead'),
    needsCeilingAccess: true,
  },
  {
    code: 'CL-04',
    group: 'clearance',
    title: 'Service side blocked',
    description:
      "Duct, pipe, framing or another trade's work sits closer to the unit's service side (electrical box, filter, drain pan) than the model allows, so it cannot be serviced in place.",
    unitKinds: CONCEALED,
    defaultSeverity: 'major',
    trade: 'mechanical',
    measuredRule: {
      measure: "Clear distance in front of the unit's service side",
      quantity: 'length',
      comparison: 'at_least',
      limit: { from: 'model', key: 'min_clearance_front' },
    },
    fixGuidance:
      'Clear the service side to the minimum distance: move the obstruction, or turn or move the unit where the obstruction cannot go.',
    caution: caution('overhead', 'attic'),
    needsCeilingAccess: true,
  },
  {
    code: 'CL-05',
    group: 'clearance',
    title: 'Access panel missing or in the wrong place',
    description:
      "In a closed ceiling there is no access panel, or the panel is too small or not below the unit's electrical box, filter, drain connection and valves.",
    unitKinds: [...CASSETTES, ...CONCEALED],
    defaultSeverity: 'major',
    trade: 'ceilings',
    fixGuidance:
      'Install an access panel at least the size the design calls for, directly below the parts that need service; agree its position with the mechanical crew before cutting.',
    caution: caution('overhead'),
    needsCeilingAccess: false,
  },
  {
    code: 'CL-06',
    group: 'clearance',
    title: 'Working space too shallow',
    description:
      "The clear working space in front of the unit's service side is shallower than the code minimum, leaving no room to stand or kneel to service it.",
    unitKinds: CONCEALED,
    defaultSeverity: 'major',
    trade: 'general',
    measuredRule: {
      measure: "Depth of clear working space in front of the unit's service side",
      quantity: 'length',
      comparison: 'at_least',
      // IMC 306.1 on commercial work, IRC M1305.1 on a job that works to the IRC alone (clearance.ts workingSpaceCode).
      codeCheck: 'working_space_depth',
    },
    fixGuidance:
      'Clear or enlarge the space in front of the service side to at least the code depth by moving stored material or other services; change framing only with the designer.',
    caution: caution('overhead', 'attic'),
    needsCeilingAccess: true,
  },
  {
    code: 'CL-07',
    group: 'clearance',
    title: 'Too little space below a floor console',
    description:
      "The gap under the floor console is less than the model's minimum, so the air it draws in at its base is starved and the floor below cannot be cleaned.",
    unitKinds: ['floor_console'],
    defaultSeverity: 'major',
    trade: 'mechanical',
    measuredRule: {
      measure: 'Gap from the finished floor to the underside of the console',
      quantity: 'length',
      comparison: 'at_least',
      limit: { from: 'model', key: 'min_clearance_below' },
    },
    fixGuidance:
      'Raise the console on its wall fixings or legs to at least the minimum gap, and recheck the drain fall afterwards.',
    caution: caution(...RELOCATE),
    needsCeilingAccess: false,
  },
  {
    code: 'CL-08',
    group: 'clearance',
    title: 'Filter cannot be reached',
    description:
      "The ducted unit's filter, or the filter grille on its return, cannot be taken out without cutting the ceiling, moving ductwork or another trade's work, so it will not be cleaned.",
    unitKinds: DUCTED,
    defaultSeverity: 'major',
    trade: 'mechanical',
    fixGuidance:
      "Give the filter the access the manual shows: an access panel or filter grille directly at the filter's slide-out side, with room to pull it out full length.",
    caution: caution('fan', 'overhead', 'attic'),
    needsCeilingAccess: true,
  },

  {
    code: 'CL-09',
    group: 'clearance',
    title: 'Working space too narrow',
    description:
      "The clear working space in front of the unit's service side is narrower than the code minimum (IMC 306.1 on commercial work; IRC M1305.1 where the job works to the IRC alone).",
    unitKinds: CONCEALED,
    defaultSeverity: 'major',
    trade: 'general',
    measuredRule: {
      measure: "Width of clear working space in front of the unit's service side",
      quantity: 'length',
      comparison: 'at_least',
      codeCheck: 'working_space_width',
    },
    fixGuidance:
      'Widen the clear space in front of the service side to at least the code width by moving stored material or other services; change framing only with the designer.',
    caution: caution('overhead', 'attic'),
    needsCeilingAccess: true,
  },
  {
    code: 'CL-10',
    group: 'clearance',
    title: 'Attic access opening too small',
    description:
      'The opening into the attic that holds the unit is smaller than the code asks (IMC 306.3: a clear opening of the code size each way, and large enough to take the unit out). Not applicable where the unit is not in an attic.',
    unitKinds: CONCEALED,
    defaultSeverity: 'major',
    trade: 'general',
    measuredRule: {
      measure: 'Smaller side of the clear attic access opening (check the larger side against the code by eye)',
      quantity: 'length',
      comparison: 'at_least',
      codeCheck: 'attic_opening',
    },
    fixGuidance:
      'Enlarge the attic opening to the code size and to the size the unit needs to come out, framed by the carpenter; keep the passageway to the unit clear.',
    caution: caution('attic', 'overhead'),
    needsCeilingAccess: false,
  },

  // ---- Condensate drainage (DR) ------------------------------------------------------------
  {
    code: 'DR-01',
    group: 'drainage',
    title: 'Drain too flat',
    description:
      'The gravity drain falls less than the code minimum, runs uphill or sags between supports, so water stands in the pipe and backs up toward the unit.',
    unitKinds: ALL_KINDS,
    defaultSeverity: 'major',
    trade: 'mechanical',
    measuredRule: {
      measure: 'Fall of the drain over a measured horizontal run',
      quantity: 'slope',
      comparison: 'at_least',
      limit: { from: 'code', key: 'imc.condensate.min_slope' },
    },
    fixGuidance:
      'Regrade the drain so it falls all the way from the unit to its outlet at no less than the minimum, adding supports so it cannot sag.',
    caution: caution('overhead'),
    needsCeilingAccess: true,
  },
  {
    code: 'DR-02',
    group: 'drainage',
    title: 'Drain supports too far apart',
    description:
      'Drain hangers are farther apart than the job allows (or, without a job spacing, than IMC Table 305.4 allows for the pipe), or the drain is tied to other services instead of its own hangers, so it sags and holds water.',
    unitKinds: ALL_KINDS,
    defaultSeverity: 'major',
    trade: 'mechanical',
    measuredRule: {
      measure: 'Longest span between drain pipe supports (add the pipe, e.g. "3 ft for 3/4 in CPVC"; PVC when not said)',
      quantity: 'length',
      comparison: 'at_most',
      limit: { from: 'job', key: 'max_drain_support_spacing' },
      // The job's spacing where set; otherwise IMC Table 305.4's plastic drain rows (PVC, or CPVC by size).
      codeCheck: 'drain_support_spacing',
    },
    fixGuidance:
      'Add hangers so no span is longer than the job spacing (or the code spacing for the pipe), with the drain on its own supports and its fall kept.',
    caution: caution('overhead'),
    needsCeilingAccess: true,
  },
  {
    code: 'DR-03',
    group: 'drainage',
    title: 'Pump lift too high',
    description:
      "The drain rises higher above the unit than its pump is rated to lift, so the pump runs without emptying the pan and the unit overflows or stops on a water fault.",
    unitKinds: PUMPED,
    defaultSeverity: 'major',
    trade: 'mechanical',
    measuredRule: {
      measure: 'Height of the top of the lift pipe above the point the manual measures from',
      quantity: 'length',
      comparison: 'at_most',
      limit: { from: 'model', key: 'max_pump_lift' },
    },
    fixGuidance:
      'Bring the top of the lift down to within the rating and fall from there to the drain main; where that cannot be done, the design needs a separate pump sized for the lift.',
    caution: caution('overhead'),
    needsCeilingAccess: true,
  },
  {
    code: 'DR-04',
    group: 'drainage',
    title: 'Lift too far from the unit',
    description:
      'The drain runs sideways farther than the model allows before it rises, so water in the pipe runs back into the pan each time the pump stops.',
    unitKinds: PUMPED,
    defaultSeverity: 'major',
    trade: 'mechanical',
    measuredRule: {
      measure: "Horizontal distance from the unit's drain outlet to the foot of the lift pipe",
      quantity: 'length',
      comparison: 'at_most',
      limit: { from: 'model', key: 'max_drain_horizontal_run' },
    },
    fixGuidance:
      "Rise straight up as close to the unit's outlet as the manual shows, then fall to the main at no less than the minimum slope.",
    caution: caution('overhead'),
    needsCeilingAccess: true,
  },
  {
    code: 'DR-05',
    group: 'drainage',
    title: 'Drain not water-tested',
    description:
      "There is no record that water was poured into the unit's pan and seen to drain away, with the pump running where fitted and every joint dry.",
    unitKinds: ALL_KINDS,
    defaultSeverity: 'major',
    trade: 'mechanical',
    measuredRule: {
      measure: 'Water test done: water poured into the pan drained away and every joint stayed dry',
      quantity: 'boolean',
      comparison: 'yes_no',
      expected: true,
    },
    fixGuidance:
      'Pour the amount of water the manual suggests into the pan, confirm the pump runs where fitted, water reaches the outlet and no joint weeps; record the test with a photo.',
    caution: caution('electrical', 'overhead'),
    needsCeilingAccess: false,
  },
  {
    code: 'DR-06',
    group: 'drainage',
    title: "Drain glued at the unit's outlet",
    description:
      "The drain is glued onto the unit's drain outlet where the manual asks for the supplied hose and clamp or another removable joint, so the unit cannot be serviced and the outlet can crack.",
    unitKinds: [...CASSETTES, 'floor_ceiling', ...DUCTED],
    defaultSeverity: 'major',
    trade: 'mechanical',
    fixGuidance:
      'Cut out the glued joint without harming the outlet and reconnect with the parts and method the manual gives; replace the outlet if it is damaged.',
    caution: caution('overhead'),
    needsCeilingAccess: true,
  },
  {
    code: 'DR-07',
    group: 'drainage',
    title: 'Trap where the manual says none',
    description:
      "The model's installation manual says its drain runs without a trap (a check valve meets the code's check valve or trap instead), but a trap, or a dip that holds water like one, has been fitted, so the drain can air-lock, gurgle or overflow the pan. Common practice, not a code rule: the manual decides.",
    unitKinds: DUCTLESS,
    defaultSeverity: 'major',
    trade: 'mechanical',
    fixGuidance:
      'Follow the manual: where it says no trap, take the trap or dip out, give the drain a continuous fall, and fit the in-line check valve the manual allows so the drain still has a check valve or a trap.',
    caution: caution('overhead'),
    needsCeilingAccess: true,
  },
  {
    code: 'DR-08',
    group: 'drainage',
    title: 'Trap or check valve missing',
    description:
      "A ducted unit's or air handler's drain that the manual says needs a trap (the fan pulls air through the pan) or a check valve (a pumped drain joining a shared main) has none, so air is drawn up the drain or other units' water runs back into this one.",
    unitKinds: CONCEALED,
    defaultSeverity: 'major',
    trade: 'mechanical',
    fixGuidance:
      'Fit a trap of the depth the manual gives, close to the unit and cleanable, or a check valve the right way round where the manual or design calls for one, where it can be reached.',
    caution: caution('overhead'),
    needsCeilingAccess: true,
  },
  {
    code: 'DR-09',
    group: 'drainage',
    title: 'Drain vent missing or misplaced',
    description:
      'The drain has no vent where the manual or design calls for one, the vent is capped, or it sits on a pumped section where water can spill out of it.',
    unitKinds: ALL_KINDS,
    defaultSeverity: 'major',
    trade: 'mechanical',
    fixGuidance:
      "Fit an open vent at the point the manual or design shows, rising above the unit's drain pan, and keep it off pumped sections unless the manual says otherwise.",
    caution: caution('overhead'),
    needsCeilingAccess: true,
  },
  {
    code: 'DR-10',
    group: 'drainage',
    title: 'Auxiliary pan missing, shallow or small',
    description:
      'Where the design protects the unit with an auxiliary pan, there is none, or the pan is shallower than the code minimum or not enough larger than the unit to catch its drips.',
    unitKinds: CONCEALED,
    defaultSeverity: 'major',
    trade: 'mechanical',
    measuredRule: {
      measure: 'Depth of the auxiliary pan under the unit (zero when there is none)',
      quantity: 'length',
      comparison: 'at_least',
      limit: { from: 'code', key: 'imc.aux_pan.min_depth' },
    },
    fixGuidance:
      'Fit a pan at least the code depth, larger than the unit by at least the code amount, with its own drain to a place where people will notice water or a water-level switch that stops the unit.',
    caution: caution('lifting', 'overhead', 'attic'),
    needsCeilingAccess: true,
  },
  {
    code: 'DR-11',
    group: 'drainage',
    title: 'Overflow switch missing or not stopping the unit',
    description:
      'The water-level (overflow) switch the design or code calls for is missing, not connected, or only raises an alarm where it must stop the unit on high water.',
    unitKinds: CONCEALED,
    defaultSeverity: 'major',
    trade: 'mechanical',
    fixGuidance:
      "Fit the switch in the pan or drain at the height the maker shows, wire it to stop the unit's cooling on high water, and test it by raising the water level.",
    caution: caution('electrical', 'overhead', 'attic'),
    needsCeilingAccess: true,
  },
  {
    code: 'DR-12',
    group: 'drainage',
    title: 'No check valve or trap on a ductless drain',
    description:
      "A ductless unit's condensate drain has neither an in-line check valve nor a trap. IMC 2018 Section 307.2.4.1 asks for one or the other on ductless mini-split drains; the manual says which.",
    unitKinds: DUCTLESS,
    defaultSeverity: 'major',
    trade: 'mechanical',
    measuredRule: {
      measure: 'In-line check valve or trap on the drain',
      quantity: 'boolean',
      comparison: 'yes_no',
      expected: true,
      codeCheck: 'ductless_check_valve_or_trap',
    },
    fixGuidance:
      'Fit the in-line check valve or the trap the manual allows, the right way round and where it can be reached, then water-test the drain.',
    caution: caution('overhead'),
    needsCeilingAccess: true,
  },
  {
    code: 'DR-13',
    group: 'drainage',
    title: 'Float switch bypassed',
    description:
      "The unit's float (high-water) switch is unplugged, jumpered out or taped down, so the pan can overflow into the ceiling without the unit stopping.",
    unitKinds: PUMPED,
    defaultSeverity: 'critical',
    trade: 'mechanical',
    fixGuidance:
      'Reconnect the float switch on its own plug, remove any jumper, and test it by filling the pan until the unit stops with a water fault.',
    caution: caution('electrical', 'overhead'),
    needsCeilingAccess: false,
  },
  {
    code: 'DR-14',
    group: 'drainage',
    title: 'Accessory pump lift too high',
    description:
      'Where an accessory condensate pump is fitted, the drain rises higher above it than the pump is rated to lift, so the pump runs without emptying and the unit overflows.',
    unitKinds: ACCESSORY_PUMPED,
    defaultSeverity: 'major',
    trade: 'mechanical',
    measuredRule: {
      measure: 'Height of the top of the pump\'s discharge above the pump',
      quantity: 'length',
      comparison: 'at_most',
      limit: { from: 'model', key: 'max_accessory_pump_lift' },
    },
    fixGuidance:
      "Bring the top of the lift within the pump's rating and fall from there, or fit a pump rated for the lift; not applicable where no pump is fitted.",
    caution: caution('electrical'),
    needsCeilingAccess: false,
  },
  {
    code: 'DR-15',
    group: 'drainage',
    title: 'Accessory pump alarm does not stop the unit',
    description:
      "The accessory pump's high-water (alarm) switch is not wired, or only sounds an alarm, so the unit keeps making water when the pump fails.",
    unitKinds: ACCESSORY_PUMPED,
    defaultSeverity: 'major',
    trade: 'mechanical',
    measuredRule: {
      measure: 'Lifting the pump\'s float stops the unit',
      quantity: 'boolean',
      comparison: 'yes_no',
      expected: true,
    },
    fixGuidance:
      "Wire the pump's alarm contacts to the unit's terminals the manual names so high water stops the unit, and test it by lifting the float.",
    caution: caution('electrical'),
    needsCeilingAccess: false,
  },
  {
    code: 'DR-16',
    group: 'drainage',
    title: 'Drain not to an approved point',
    description:
      'The drain ends somewhere the code or the design does not accept as a place of disposal: onto a walkway or roof surface, into a planter, a vent or a sink without an air gap.',
    unitKinds: ALL_KINDS,
    defaultSeverity: 'major',
    trade: 'plumbing',
    fixGuidance:
      'Run the drain to the disposal point the design shows, with the air gap or indirect connection the plumbing code asks for there.',
    caution: caution('drilling', 'overhead'),
    needsCeilingAccess: false,
  },

  {
    code: 'DR-17',
    group: 'drainage',
    title: 'Drain pipe too small for the capacity',
    description:
      'The condensate drain is smaller than IMC Table 307.2.2 asks for the equipment capacity it carries: the unit\'s own, or on a manifolded drain every unit upstream of the point measured.',
    unitKinds: ALL_KINDS,
    defaultSeverity: 'major',
    trade: 'mechanical',
    measuredRule: {
      measure: 'Drain pipe size (on a manifolded drain add the capacity it carries, e.g. "1 in for 24 tons")',
      quantity: 'length',
      comparison: 'at_least',
      codeCheck: 'drain_pipe_size',
    },
    fixGuidance:
      'Replace the undersized drain, or the manifold section, with the size the table gives for the capacity it carries, never smaller toward the outlet, and keep its fall.',
    caution: caution('overhead'),
    needsCeilingAccess: true,
  },
  {
    code: 'DR-18',
    group: 'drainage',
    title: 'Auxiliary drain pan too shallow',
    description:
      'The auxiliary pan under a unit where overflow would damage the building is shallower than IMC 307.2.3 asks. Not applicable where the design uses another overflow method.',
    unitKinds: CONCEALED,
    defaultSeverity: 'major',
    trade: 'mechanical',
    measuredRule: {
      measure: 'Depth of the auxiliary drain pan',
      quantity: 'length',
      comparison: 'at_least',
      codeCheck: 'aux_pan_depth',
    },
    fixGuidance: 'Fit a pan of the code depth under the whole unit, with its own drain or a water-level switch that stops the unit.',
    caution: caution('lifting', 'overhead', 'attic'),
    needsCeilingAccess: true,
  },
  {
    code: 'DR-19',
    group: 'drainage',
    title: 'Auxiliary drain pan too small for the unit',
    description:
      'The auxiliary pan does not reach far enough beyond the unit: IMC 307.2.3 asks for a pan larger than the unit by a set amount in length and in width.',
    unitKinds: CONCEALED,
    defaultSeverity: 'major',
    trade: 'mechanical',
    measuredRule: {
      measure: 'How much larger the pan is than the unit, on its shorter side (pan less unit)',
      quantity: 'length',
      comparison: 'at_least',
      codeCheck: 'aux_pan_oversize',
    },
    fixGuidance: 'Replace the pan with one at least the code size larger than the unit each way, set under the whole unit.',
    caution: caution('lifting', 'overhead', 'attic'),
    needsCeilingAccess: true,
  },

  // ---- Wall and roof penetrations (PN) -----------------------------------------------------
  {
    code: 'PN-01',
    group: 'penetrations',
    title: 'Wall opening not sloped outward',
    description:
      'The hole through the outside wall for piping, drain and cable does not fall toward the outside, so rain and condensate can run back into the wall.',
    unitKinds: WALL_OR_FLOOR,
    defaultSeverity: 'major',
    trade: 'mechanical',
    measuredRule: {
      measure: 'Fall of the wall hole from the room side to the outside, over the wall thickness',
      quantity: 'slope',
      comparison: 'at_least',
      limit: { from: 'model', key: 'min_pipe_hole_slope' },
    },
    fixGuidance:
      'Rework the opening or its sleeve so it falls to the outside by the amount the manual shows, then seal it again inside and out.',
    caution: caution('drilling'),
    needsCeilingAccess: false,
  },
  {
    code: 'PN-02',
    group: 'penetrations',
    title: 'Wall or roof opening not sealed',
    description:
      'An opening around piping, drain or cable is left open, filled with foam alone where weather sealing or flashing is needed, or sealed with gaps, so air, water and pests get in.',
    unitKinds: ALL_KINDS,
    defaultSeverity: 'major',
    trade: 'general',
    fixGuidance:
      'Seal the outside face with a weather-resistant sealant or fitted cover, flash roof openings with a boot or curb made for the purpose, and seal the inside against air leakage.',
    caution: caution('overhead'),
    needsCeilingAccess: false,
  },
  {
    code: 'PN-03',
    group: 'penetrations',
    title: 'No sleeve through wall or floor',
    description:
      'Piping, drain or cable passes through masonry, concrete or framing with no sleeve, so movement wears through the insulation and, in time, the pipe.',
    unitKinds: ALL_KINDS,
    defaultSeverity: 'major',
    trade: 'mechanical',
    fixGuidance:
      'Fit sleeves sized for the insulated pipe, protect the insulation where it passes through, and seal the gap around it as the wall or floor requires.',
    caution: caution('drilling', 'overhead'),
    needsCeilingAccess: true,
  },
  {
    code: 'PN-04',
    group: 'penetrations',
    title: 'Fire-stopping missing',
    description:
      'Where piping, drain or cable passes through a fire-rated wall or floor, the opening is not fire-stopped, or the fire-stopping does not match a listed system for that wall and those pipes.',
    unitKinds: ALL_KINDS,
    defaultSeverity: 'critical',
    trade: 'mechanical',
    fixGuidance:
      'Fire-stop the opening with a listed system that matches the rating, pipe material and insulation, install it exactly as its listing shows, and label it where the job requires.',
    caution: caution('overhead'),
    needsCeilingAccess: true,
  },

  // ---- Panels, grilles and gaskets (PG) ----------------------------------------------------
  {
    code: 'PG-01',
    group: 'panels',
    title: 'Panel not seated or not level',
    description:
      'The decorative panel leaves a gap at a corner or edge, or sits out of level or out of square with the ceiling, often because the unit body is set too high, too low or skewed.',
    unitKinds: CASSETTES,
    defaultSeverity: 'major',
    trade: 'mechanical',
    fixGuidance:
      "Set the body to the ceiling line the manual gives and level it, plug in the panel's harness, then refit the panel and tighten its fixings evenly until it sits tight all round.",
    caution: caution('electrical', 'overhead'),
    needsCeilingAccess: false,
  },
  {
    code: 'PG-02',
    group: 'panels',
    title: 'Panel gasket broken or missing',
    description:
      'The seal between the panel and the unit body is torn, missing in places or folded over, so room air leaks onto cold parts and they drip.',
    unitKinds: CASSETTES,
    defaultSeverity: 'major',
    trade: 'mechanical',
    fixGuidance:
      "Fit a new gasket (the maker's part) in one continuous length with its ends butted tight, then refit the panel.",
    caution: caution('overhead'),
    needsCeilingAccess: false,
  },
  {
    code: 'PG-03',
    group: 'panels',
    title: 'Filter missing or still wrapped',
    description:
      'The air filter is missing, still in its packing or fitted the wrong way round, or the unit ran during dusty work without one and its coil is loaded.',
    unitKinds: ALL_KINDS,
    defaultSeverity: 'major',
    trade: 'mechanical',
    fixGuidance:
      'Fit clean filters of the right type and size the right way round; if the unit ran without filters during dusty work, clean the coil and fan before startup.',
    caution: caution('electrical', 'fan'),
    needsCeilingAccess: false,
  },
  {
    code: 'PG-04',
    group: 'panels',
    title: 'Cassette body at the wrong height',
    description:
      "The cassette body sits higher or lower above the ceiling than the model's range, so the panel cannot seat: it leaves gaps, bows the ceiling or will not latch.",
    unitKinds: CASSETTES,
    defaultSeverity: 'major',
    trade: 'mechanical',
    measuredRule: {
      measure: 'Height from the underside of the ceiling to the underside of the cassette body',
      quantity: 'length',
      comparison: 'between',
      limit: { from: 'model', key: 'min_body_to_ceiling' },
      upper: { from: 'model', key: 'max_body_to_ceiling' },
    },
    fixGuidance:
      "Lower or raise the body on its hanger nuts to within the model's height, check it with the installation gauge the maker supplies, level it and lock the nuts.",
    caution: caution('lifting', 'overhead'),
    needsCeilingAccess: false,
  },
  {
    code: 'PG-05',
    group: 'panels',
    title: 'Panel harness or louvre connector not plugged in',
    description:
      "The decorative panel's harness or its louvre motor connector is unplugged, half-seated, or pinched between the panel and the body, so the louvres do not move or the unit shows a fault.",
    unitKinds: CASSETTES,
    defaultSeverity: 'major',
    trade: 'mechanical',
    fixGuidance:
      'Plug every panel connector fully home, route the harness through the clips the manual shows so the panel cannot pinch it, then refit the panel and check the louvres swing.',
    caution: caution('electrical', 'fan', 'overhead'),
    needsCeilingAccess: false,
  },
  {
    code: 'PG-06',
    group: 'panels',
    title: 'Ceiling opening the wrong size',
    description:
      "The hole cut in the ceiling for the cassette is larger or smaller than the model's opening, so the panel does not cover its edge or the body cannot pass.",
    unitKinds: CASSETTES,
    defaultSeverity: 'major',
    trade: 'ceilings',
    measuredRule: {
      measure: 'Length of each side of the ceiling opening (the one furthest from the model\'s size)',
      quantity: 'length',
      comparison: 'between',
      limit: { from: 'model', key: 'min_ceiling_opening' },
      upper: { from: 'model', key: 'max_ceiling_opening' },
    },
    fixGuidance:
      "Recut or patch the opening to the size the model's manual or paper template gives, square to the body.",
    caution: caution('overhead'),
    needsCeilingAccess: false,
  },
  {
    code: 'PG-07',
    group: 'panels',
    title: 'Knockout used where the model does not allow it',
    description:
      'A fresh-air or branch-duct knockout of the cassette is opened where the model has none of that kind, beyond the air volume or duct size the model allows, or without the insulation and flange the manual calls for, so it sweats or upsets the airflow.',
    unitKinds: CASSETTES,
    defaultSeverity: 'major',
    trade: 'mechanical',
    fixGuidance:
      "Use only the knockouts the model's manual allows, with its flange, insulation and the setting it names; close any other opening with the maker's part.",
    caution: caution('electrical', 'overhead'),
    needsCeilingAccess: true,
  },
  {
    code: 'PG-08',
    group: 'panels',
    title: 'Outlet blanked without the matching setting',
    description:
      'An outlet of the four-way cassette is closed off with a blanking kit, but the airflow setting the manual asks for with it was not made, so the coil can freeze or the fan runs against the block.',
    unitKinds: FOUR_WAY,
    defaultSeverity: 'major',
    trade: 'controls',
    fixGuidance:
      'Make the outlet setting the manual gives for the number of outlets in use, from the controller or on the board, and record it.',
    caution: caution('electrical', 'fan'),
    needsCeilingAccess: false,
  },
  {
    code: 'PG-09',
    group: 'panels',
    title: 'Compact cassette does not fit the grid cell',
    description:
      'The compact cassette should drop into one standard ceiling grid cell (the 600 mm or 2 ft module its manual names) with the panel lying on the tees; here a main runner or cross tee was cut or moved, or the panel does not cover the cell.',
    unitKinds: ['cassette_compact'],
    defaultSeverity: 'major',
    trade: 'ceilings',
    measuredRule: {
      measure: 'Fits one standard grid cell with no main runner cut',
      quantity: 'boolean',
      comparison: 'yes_no',
      expected: true,
    },
    fixGuidance:
      'Restore the grid around the unit to one full cell with uncut main runners, support the unit from structure as the manual shows, and seat the panel on the tees.',
    caution: caution('overhead'),
    needsCeilingAccess: false,
  },
  {
    code: 'PG-10',
    group: 'panels',
    title: 'Front panel or its screws not refitted',
    description:
      'The front panel or the side covers of the floor or floor/ceiling unit are off, loose or missing screws after piping and wiring, leaving the electrical box and fan within reach.',
    unitKinds: FLOOR_UNITS,
    defaultSeverity: 'major',
    trade: 'mechanical',
    fixGuidance:
      'Refit the front panel and every cover with all the screws the manual shows, with no cable or pipe trapped under an edge.',
    caution: caution('electrical', 'fan'),
    needsCeilingAccess: false,
  },
  {
    code: 'PG-11',
    group: 'panels',
    title: 'Return opening left open or plenum missing',
    description:
      "The ducted unit's unused return opening (rear or bottom) is left open instead of closed with its cover, or the return plenum or filter box the design shows is missing, so the unit draws dusty ceiling air past the filter.",
    unitKinds: DUCTED,
    defaultSeverity: 'major',
    trade: 'mechanical',
    fixGuidance:
      'Close the unused return opening with the cover plate the unit came with, sealed, and fit the return plenum or filter box the design shows.',
    caution: caution('fan', 'overhead'),
    needsCeilingAccess: true,
  },

  // ---- Wiring, harnesses and terminals (EL) ------------------------------------------------
  {
    code: 'EL-01',
    group: 'wiring',
    title: 'Disconnect not within sight',
    description:
      'No disconnecting means can be seen from the unit, so a technician cannot be sure the supply stays off while working on it.',
    unitKinds: ALL_KINDS,
    defaultSeverity: 'critical',
    trade: 'electrical',
    measuredRule: {
      measure: 'Disconnect visible from the unit',
      quantity: 'boolean',
      comparison: 'yes_no',
      expected: true,
    },
    fixGuidance:
      'Install a disconnect within sight of the unit as local code defines it (or an arrangement the code accepts instead) and label it with the unit tag.',
    caution: caution('electrical'),
    needsCeilingAccess: false,
  },
  {
    code: 'EL-02',
    group: 'wiring',
    title: 'Disconnect too far away',
    description:
      "The disconnect can be seen from the unit but is farther away than the code's limit for within sight.",
    unitKinds: ALL_KINDS,
    defaultSeverity: 'critical',
    trade: 'electrical',
    measuredRule: {
      measure: 'Distance from the unit to its disconnect',
      quantity: 'length',
      comparison: 'at_most',
      limit: { from: 'code', key: 'nec.disconnect.max_distance' },
    },
    fixGuidance: 'Move the disconnect closer, within the code distance and still in sight of the unit.',
    caution: caution('electrical'),
    needsCeilingAccess: false,
  },
  {
    code: 'EL-03',
    group: 'wiring',
    title: 'Terminal loose or not torqued',
    description:
      "A field wire at the unit's terminal block or at the disconnect is loose, not fully landed, has stray strands or insulation under the clamp, or was not tightened to the maker's torque.",
    unitKinds: ALL_KINDS,
    defaultSeverity: 'critical',
    trade: 'electrical',
    fixGuidance:
      "Reland each conductor fully with no stray strands or insulation under the clamp, tighten to the maker's torque with a torque screwdriver, and mark the screw.",
    caution: caution('electrical'),
    needsCeilingAccess: false,
  },
  {
    code: 'EL-04',
    group: 'wiring',
    title: 'No strain relief on a cable',
    description:
      'A power or communication cable enters the unit or disconnect without its clamp or connector tightened on the sheath, so any pull on the cable lands on the terminals.',
    unitKinds: ALL_KINDS,
    defaultSeverity: 'major',
    trade: 'electrical',
    fixGuidance:
      'Fit and tighten the clamp the unit provides, or a listed connector, on the outer sheath, and leave a little slack inside the box.',
    caution: caution('electrical'),
    needsCeilingAccess: false,
  },
  {
    code: 'EL-05',
    group: 'wiring',
    title: 'Power and communication wiring run together',
    description:
      'Communication or controller cable is bundled with power wiring, or runs closer to it than the manual allows, inviting interference and communication faults.',
    unitKinds: ALL_KINDS,
    defaultSeverity: 'major',
    trade: 'electrical',
    fixGuidance:
      'Reroute the communication cable on its own path with the separation the manual gives, crossing power wiring at right angles where the two must cross.',
    caution: caution('electrical', 'overhead'),
    needsCeilingAccess: true,
  },
  {
    code: 'EL-06',
    group: 'wiring',
    title: 'Communication wires on power terminals',
    description:
      'Communication or controller wires are landed on the power terminals, or power on the communication terminals, which can destroy control boards when the supply is switched on.',
    unitKinds: ALL_KINDS,
    defaultSeverity: 'critical',
    trade: 'electrical',
    fixGuidance:
      "Correct the terminations against the unit's wiring diagram and have the boards checked before the supply is switched on again.",
    caution: caution('electrical'),
    needsCeilingAccess: false,
  },
  {
    code: 'EL-07',
    group: 'wiring',
    title: 'Ground not connected',
    description:
      "The equipment grounding conductor is not connected to the unit's ground terminal, or is held under a loose or painted screw.",
    unitKinds: ALL_KINDS,
    defaultSeverity: 'critical',
    trade: 'electrical',
    fixGuidance:
      "Land the grounding conductor on the unit's marked ground terminal, tight to bare metal, and confirm continuity back to the panel.",
    caution: caution('electrical'),
    needsCeilingAccess: false,
  },
  {
    code: 'EL-08',
    group: 'wiring',
    title: 'Electrical box left open',
    description:
      "The unit's electrical box cover or the disconnect cover is missing or left off, or unused openings are left open, exposing live parts.",
    unitKinds: ALL_KINDS,
    defaultSeverity: 'critical',
    trade: 'electrical',
    fixGuidance: 'Refit every cover with all its screws and close unused openings with listed plugs.',
    caution: caution('electrical'),
    needsCeilingAccess: false,
  },
  {
    code: 'EL-09',
    group: 'wiring',
    title: 'Disconnect not readily accessible',
    description:
      "The unit's disconnect can be seen but not reached without a ladder, moving stored material or ceiling tiles, or unlocking a room, as within sight and readily accessible asks (NFPA 70 Section 440.14; from memory, confirm in the job's edition).",
    unitKinds: ALL_KINDS,
    defaultSeverity: 'critical',
    trade: 'electrical',
    measuredRule: {
      measure: 'Disconnect reachable without a ladder, tools or moving anything',
      quantity: 'boolean',
      comparison: 'yes_no',
      expected: true,
    },
    fixGuidance:
      'Move the disconnect to where it can be reached quickly without climbing or moving anything, still within sight of the unit, and label it.',
    caution: caution('electrical'),
    needsCeilingAccess: false,
  },
  {
    code: 'EL-10',
    group: 'wiring',
    title: 'Disconnect fixed on an access panel',
    description:
      "The disconnect is fastened to a panel that must come off to service the unit, or covers the unit's nameplate, which the code does not allow (NFPA 70 Section 440.14; from memory, confirm in the job's edition).",
    unitKinds: ALL_KINDS,
    defaultSeverity: 'major',
    trade: 'electrical',
    fixGuidance:
      'Move the disconnect onto fixed structure or a part of the unit the manual allows, clear of the access panels and the nameplate.',
    caution: caution('electrical'),
    needsCeilingAccess: false,
  },

  // ---- Sensors (SN) ------------------------------------------------------------------------
  {
    code: 'SN-01',
    group: 'sensors',
    title: 'Return-air sensor out of place',
    description:
      "The unit's return-air sensor has been pulled from its holder, is left dangling, or sits out of the return air stream where the manual puts it.",
    unitKinds: ALL_KINDS,
    defaultSeverity: 'major',
    trade: 'mechanical',
    fixGuidance:
      'Refit the sensor in its holder, or where the manual says to move it for this kind of installation, fix it in the return air stream away from supply air and heat.',
    caution: caution('electrical'),
    needsCeilingAccess: false,
  },
  {
    code: 'SN-02',
    group: 'sensors',
    title: 'Pipe sensor badly placed',
    description:
      'A field-fitted pipe sensor on the coil kit is at the wrong angle around the pipe, on the wrong pipe or position, loose, or not insulated, so it reads the air instead of the refrigerant.',
    unitKinds: ['ahu_coil_kit'],
    defaultSeverity: 'major',
    trade: 'mechanical',
    measuredRule: {
      measure: "Angle of the sensor from the pipe's centre line",
      quantity: 'angle',
      comparison: 'at_most',
      limit: { from: 'model', key: 'max_sensor_angle' },
    },
    fixGuidance:
      'Fit the sensor on the pipe and at the position the manual names, at the angle it gives, clamped tight with full contact, then insulate over it.',
    caution: caution('electrical'),
    needsCeilingAccess: false,
  },
  {
    code: 'SN-03',
    group: 'sensors',
    title: 'Remote sensor in a poor spot',
    description:
      'A remote sensor, or a controller with a built-in sensor, is placed where it cannot read the room: in sun or a supply-air stream, near heat or a door, on an outside wall, or in a cupboard.',
    unitKinds: ALL_KINDS,
    defaultSeverity: 'minor',
    trade: 'controls',
    fixGuidance:
      'Move the sensor to an inside wall in the occupied zone at the height the design shows, away from drafts and heat, and seal the cable hole behind it.',
    caution: caution('electrical'),
    needsCeilingAccess: false,
  },
  {
    code: 'SN-04',
    group: 'sensors',
    title: 'Coil kit air sensor out of place',
    description:
      "A return-air or discharge-air sensor of the coil kit is not where the kit's manual puts it in the air handler: left coiled in the box, in the wrong air stream, or touching the coil.",
    unitKinds: ['ahu_coil_kit'],
    defaultSeverity: 'major',
    trade: 'controls',
    fixGuidance:
      "Fix each sensor at the position the kit's manual shows, in the air stream it names, clear of the coil and heaters, with its cable secured.",
    caution: caution('electrical', 'fan'),
    needsCeilingAccess: false,
  },

  // ---- Refrigerant piping (RP) -------------------------------------------------------------
  {
    code: 'RP-01',
    group: 'piping',
    title: 'Brazed without nitrogen',
    description:
      'Joints were brazed without nitrogen flowing through the pipe, leaving scale inside that can block valves and strainers; scale shows at a cut or open end, or no one can confirm a purge.',
    unitKinds: ALL_KINDS,
    defaultSeverity: 'critical',
    trade: 'mechanical',
    fixGuidance:
      'Cut out and remake joints found with scale, with nitrogen flowing, and clean the section as the manual allows; purge every brazed joint from then on and record it.',
    caution: caution('refrigerant', 'brazing', 'overhead'),
    needsCeilingAccess: true,
  },
  {
    code: 'RP-02',
    group: 'piping',
    title: 'Pipe ends open or not flushed',
    description:
      'Pipe ends were left open to dust and moisture during construction, or runs were not blown through before connecting, so debris or water can reach the system.',
    unitKinds: ALL_KINDS,
    defaultSeverity: 'major',
    trade: 'mechanical',
    fixGuidance:
      'Cap every open end until it is connected, blow each run through with dry nitrogen before connecting, and where water got in, follow the manual for drying the piping.',
    caution: caution('refrigerant', 'pressure', 'overhead'),
    needsCeilingAccess: true,
  },
  {
    code: 'RP-03',
    group: 'piping',
    title: 'Flare joint badly made or not torqued',
    description:
      "A flare is cracked, off-centre or the wrong size, or its nut was tightened by feel instead of to the maker's torque, so the joint may leak.",
    unitKinds: ALL_KINDS,
    defaultSeverity: 'critical',
    trade: 'mechanical',
    fixGuidance:
      'Cut back and remake the flare with the right tool and size, using only the lubricant the manual allows, tighten with a torque wrench to the value given, and mark the nut.',
    caution: caution('refrigerant', 'overhead'),
    needsCeilingAccess: true,
  },
  {
    code: 'RP-04',
    group: 'piping',
    title: 'Insulation gaps or open joints',
    description:
      'Pipe insulation has gaps, splits or crushed spots, is missing at flare nuts, valves or branch fittings, or has unsealed seams, so the cold pipe sweats and drips.',
    unitKinds: ALL_KINDS,
    defaultSeverity: 'major',
    trade: 'insulation',
    fixGuidance:
      "Insulate every run, flare nut, valve and fitting continuously at the design thickness, seal all seams and butt joints with the insulation maker's adhesive or tape, and fit saddles so hangers do not crush it.",
    caution: caution('overhead'),
    needsCeilingAccess: true,
  },
  {
    code: 'RP-05',
    group: 'piping',
    title: 'Line set poorly supported',
    description:
      "Piping rests on the ceiling grid, ducts or other services, hangs on the unit's connections, or its horizontal supports are farther apart than code allows.",
    unitKinds: ALL_KINDS,
    defaultSeverity: 'major',
    trade: 'mechanical',
    measuredRule: {
      measure:
        'Longest span between supports on horizontal copper tubing (up to 1-1/4 in unless you add the size, e.g. "8 ft for 1-5/8 in OD")',
      quantity: 'length',
      comparison: 'at_most',
      limit: { from: 'code', key: 'imc.copper_support.horizontal_small' },
      // IMC Table 305.4's copper tubing row for the size typed after "for" (supports.ts); the smaller row without one.
      codeCheck: 'pipe_support_spacing',
    },
    fixGuidance:
      "Support the piping on its own hangers with insulation saddles, no farther apart than code allows, keep it off other services, and take its weight off the unit's connections.",
    caution: caution('refrigerant', 'overhead'),
    needsCeilingAccess: true,
  },
  {
    code: 'RP-06',
    group: 'piping',
    title: 'Riser supports too far apart',
    description: 'A vertical run of copper is supported less often than code requires, so its weight hangs on joints and bends.',
    unitKinds: ALL_KINDS,
    defaultSeverity: 'major',
    trade: 'mechanical',
    measuredRule: {
      measure: 'Longest span between supports on vertical copper',
      quantity: 'length',
      comparison: 'at_most',
      limit: { from: 'code', key: 'imc.copper_support.vertical' },
    },
    fixGuidance: 'Add riser clamps or supports so no vertical span exceeds the code spacing, with insulation protected at each clamp.',
    caution: caution('overhead'),
    needsCeilingAccess: true,
  },
  {
    code: 'RP-07',
    group: 'piping',
    title: 'Pressure test not recorded',
    description:
      "There is no record that the piping serving this unit held a nitrogen pressure test at the manual's pressure and time, or the record shows a drop.",
    unitKinds: ALL_KINDS,
    defaultSeverity: 'critical',
    trade: 'mechanical',
    measuredRule: {
      measure: 'Pressure test recorded with no drop (start and end pressure, temperature, time, tester)',
      quantity: 'boolean',
      comparison: 'yes_no',
      expected: true,
    },
    fixGuidance:
      "Test with dry nitrogen at the manual's pressure and for its duration, find and fix any drop, and record start and end pressures, temperatures, times and who did it. Test before the ceiling closes.",
    caution: caution('refrigerant', 'pressure', 'overhead'),
    needsCeilingAccess: true,
  },
  {
    code: 'RP-08',
    group: 'piping',
    title: 'Valve kit too far from the coil',
    description:
      'The expansion-valve kit is farther from the coil than the model allows, which upsets refrigerant control.',
    unitKinds: ['ahu_coil_kit'],
    defaultSeverity: 'major',
    trade: 'mechanical',
    measuredRule: {
      measure: 'Pipe length from the expansion-valve kit to the coil',
      quantity: 'length',
      comparison: 'at_most',
      limit: { from: 'model', key: 'max_valve_kit_pipe_length' },
    },
    fixGuidance:
      'Move the valve kit within the allowed length, brazing with nitrogen flowing, then pressure-test and insulate the changed piping.',
    caution: caution('refrigerant', 'brazing', 'pressure', 'overhead'),
    needsCeilingAccess: true,
  },
  {
    code: 'RP-09',
    group: 'piping',
    title: "Coil volume outside the kit's range",
    description:
      "The air handler's coil holds more or less refrigerant volume than the range the coil kit's manual allows, so the kit cannot control it.",
    unitKinds: ['ahu_coil_kit'],
    defaultSeverity: 'major',
    trade: 'mechanical',
    measuredRule: {
      measure: 'Internal volume of the coil, from the coil maker\'s data',
      quantity: 'volume',
      comparison: 'between',
      limit: { from: 'model', key: 'min_coil_internal_volume' },
      upper: { from: 'model', key: 'max_coil_internal_volume' },
    },
    fixGuidance:
      "Pair the kit with a coil inside its volume range, as the kit's selection table gives; where the coil is outside it, the design needs another kit or coil.",
    caution: caution('refrigerant', 'brazing', 'pressure'),
    needsCeilingAccess: false,
  },
  {
    code: 'RP-10',
    group: 'piping',
    title: 'Factory metering device left in the coil',
    description:
      "The coil's own expansion valve or piston is left in place where the kit's valve replaces it, so two devices throttle the flow in series.",
    unitKinds: ['ahu_coil_kit'],
    defaultSeverity: 'critical',
    trade: 'mechanical',
    fixGuidance:
      "Recover the charge, remove the coil's metering device as the kit's manual shows, remake the joint with nitrogen flowing, then pressure-test, evacuate and recharge.",
    caution: caution('refrigerant', 'brazing', 'pressure'),
    needsCeilingAccess: false,
  },
  {
    code: 'RP-11',
    group: 'piping',
    title: 'Valve box upside down or out of reach',
    description:
      "The coil kit's valve box is fixed in an orientation the manual does not allow, or where its cover cannot be opened for service.",
    unitKinds: ['ahu_coil_kit'],
    defaultSeverity: 'major',
    trade: 'mechanical',
    fixGuidance:
      'Refix the valve box the way up the manual shows, with room to open its cover and reach the valve, rebrazing with nitrogen flowing where the piping must move.',
    caution: caution('refrigerant', 'brazing', 'pressure', 'attic'),
    needsCeilingAccess: false,
  },
  {
    code: 'RP-12',
    group: 'piping',
    title: 'Materials in a return-air plenum not plenum-rated',
    description:
      'Plastic drain pipe, cable, pipe insulation or tape runs through a ceiling used as a return-air plenum without the flame-spread and smoke rating the mechanical code asks of plenum materials.',
    unitKinds: IN_PLENUM,
    defaultSeverity: 'major',
    trade: 'mechanical',
    fixGuidance:
      'Replace the material with a plenum-rated one (or enclose it as the code allows) and keep its rating label where it can be seen.',
    caution: caution('overhead'),
    needsCeilingAccess: true,
  },

  // ---- Controls and addressing (CT) --------------------------------------------------------
  {
    code: 'CT-01',
    group: 'controls',
    title: 'Address not set or duplicated',
    description:
      "The unit's address is not set, is duplicated on its system, or does not match the address schedule, so the system cannot find it or drives the wrong unit.",
    unitKinds: ALL_KINDS,
    defaultSeverity: 'major',
    trade: 'controls',
    fixGuidance:
      'Set the address from the schedule by the method the manual gives, then confirm the system sees each unit once, under its own tag.',
    caution: caution('electrical'),
    needsCeilingAccess: false,
  },
  {
    code: 'CT-02',
    group: 'controls',
    title: 'Controller loose or misplaced',
    description:
      'The wall controller is missing, hangs off the wall, is not fixed to its box or bracket, or is not where the drawings show.',
    unitKinds: ALL_KINDS,
    defaultSeverity: 'minor',
    trade: 'controls',
    fixGuidance:
      'Mount the controller on its box or bracket at the location and height on the drawings, with the cable hole behind it sealed.',
    caution: caution('electrical'),
    needsCeilingAccess: false,
  },
  {
    code: 'CT-03',
    group: 'controls',
    title: 'Group wiring wrong',
    description:
      'Units meant to share a controller are not linked as the controls drawing shows, or a unit is on the wrong group, so a controller runs the wrong units.',
    unitKinds: ALL_KINDS,
    defaultSeverity: 'major',
    trade: 'controls',
    fixGuidance:
      'Rewire the group to match the drawing, linked unit to unit as the manual shows, and check each controller runs exactly its own units.',
    caution: caution('electrical', 'overhead'),
    needsCeilingAccess: true,
  },
  staticRangeItem('CT-04', 'ducted_low', 'low'),
  staticRangeItem('CT-05', 'ducted_high', 'high'),
  staticRangeItem('CT-06', 'ducted_very_high', 'very high'),
  {
    code: 'CT-07',
    group: 'controls',
    title: 'Capacity setting does not match the coil',
    description:
      "The coil kit's capacity setting (switches or address setting) does not match the capacity of the coil it serves, so the system sizes its refrigerant flow wrongly.",
    unitKinds: ['ahu_coil_kit'],
    defaultSeverity: 'major',
    trade: 'controls',
    fixGuidance:
      "Set the capacity code the kit's manual gives for this coil, restart the kit as the manual says, and record the setting.",
    caution: caution('electrical'),
    needsCeilingAccess: false,
  },
  {
    code: 'CT-08',
    group: 'controls',
    title: 'Air handler interlock not wired',
    description:
      "The control wiring between the coil kit and the air handler is missing or wrong: the fan is not called when the kit calls, or the heater and defrost interlocks the kit's manual shows are not connected.",
    unitKinds: ['ahu_coil_kit'],
    defaultSeverity: 'critical',
    trade: 'controls',
    fixGuidance:
      "Wire the kit to the air handler's fan, heater and alarm terminals exactly as the kit's manual shows, and test each interlock with the system running.",
    caution: caution('electrical', 'fan'),
    needsCeilingAccess: false,
  },

  // ---- Labelling (LB) ----------------------------------------------------------------------
  {
    code: 'LB-01',
    group: 'labelling',
    title: 'Unit tag missing or wrong',
    description: 'The unit has no tag label, or its tag does not match the drawings and equipment schedule.',
    unitKinds: ALL_KINDS,
    defaultSeverity: 'minor',
    trade: 'mechanical',
    fixGuidance:
      "Fix a durable label with the unit's tag where it can be read from the room or through the access panel, matching the schedule exactly.",
    needsCeilingAccess: false,
  },
  {
    code: 'LB-02',
    group: 'labelling',
    title: 'Piping not labelled with its system',
    description:
      'The piping at the unit is not labelled with the system it belongs to, or with liquid and gas lines where the job asks for it.',
    unitKinds: ALL_KINDS,
    defaultSeverity: 'minor',
    trade: 'mechanical',
    fixGuidance:
      'Label each line near the unit and on both sides of walls and floors it passes through, with the system name, in the job\'s label style.',
    caution: caution('overhead'),
    needsCeilingAccess: true,
  },
  {
    code: 'LB-03',
    group: 'labelling',
    title: 'Disconnect not labelled',
    description: 'The disconnect does not say which unit it serves, or names the wrong unit.',
    unitKinds: ALL_KINDS,
    defaultSeverity: 'minor',
    trade: 'electrical',
    fixGuidance:
      'Label the disconnect with the unit tag and the panel and circuit that feed it, in the job\'s label style.',
    needsCeilingAccess: false,
  },
];

/** The built-in catalogue, in group order then code order. */
export const BUILTIN_CATALOGUE: readonly CatalogueItem[] = Object.freeze(ITEMS.map((item) => Object.freeze(item)));
