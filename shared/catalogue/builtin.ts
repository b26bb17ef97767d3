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

// ---------------------------------------------------------------------------------------------
// Unit-kind sets (kinds are data; each item lists exactly the kinds the check applies to)
// ---------------------------------------------------------------------------------------------

const CASSETTES: readonly UnitKindKey[] = ['cassette_4way', 'cassette_2way', 'cassette_compact'];
const DUCTED: readonly UnitKindKey[] = ['ducted_low', 'ducted_high', 'ducted_very_high'];
const ALL_KINDS: readonly UnitKindKey[] = [
  ...CASSETTES,
  'wall_mounted',
  'floor_console',
  'floor_ceiling',
  ...DUCTED,
  'ahu_coil_kit',
];
/** Kinds that hang from the structure on rods (a floor/ceiling unit when ceiling-hung). */
const HUNG: readonly UnitKindKey[] = [...CASSETTES, 'floor_ceiling', ...DUCTED, 'ahu_coil_kit'];
/** Kinds fixed to a wall or standing on the floor. */
const WALL_OR_FLOOR: readonly UnitKindKey[] = ['wall_mounted', 'floor_console', 'floor_ceiling'];
/** Kinds hidden in a ceiling space, attic or closet and reached through an access opening. */
const CONCEALED: readonly UnitKindKey[] = [...DUCTED, 'ahu_coil_kit'];
/** Kinds with a built-in condensate pump (or a pump kit the manual rates). */
const PUMPED: readonly UnitKindKey[] = [...CASSETTES, ...DUCTED];
/** Kinds whose manual asks for a drain that runs free, with no trap. */
const UNTRAPPED: readonly UnitKindKey[] = [...CASSETTES, 'wall_mounted', 'floor_console', 'floor_ceiling'];

// ---------------------------------------------------------------------------------------------
// Cautions: every caution ends by deferring to the manual, the codes and licensed practice
// ---------------------------------------------------------------------------------------------

type Hazard = 'electrical' | 'refrigerant' | 'brazing' | 'pressure' | 'lifting' | 'overhead';

const HAZARD_TEXT: Record<Hazard, string> = {
  electrical:
    "Electrical work: isolate and lock out the supply, and prove it dead, before opening the unit's electrical box or its disconnect.",
  refrigerant:
    'Refrigerant work: only certified technicians open the circuit; recover the charge, never vent it, and wear eye and hand protection.',
  brazing:
    'Hot work: braze with nitrogen flowing through the pipe, under a hot-work permit where the site requires one, with a fire watch and an extinguisher at hand.',
  pressure:
    'Pressure testing: use a regulator on the nitrogen cylinder, never go above the test pressure the manual sets, and keep people clear of joints under test.',
  lifting:
    "Lifting: take the unit's weight on a lift or with enough people before loosening a hanger nut or lifting it off its fixings.",
  overhead:
    'Overhead work: use a rated ladder or lift, keep the area below clear, and wear head and eye protection.',
};

const GOVERNS = "The manufacturer's installation manual, local codes and licensed practice govern.";

function caution(...hazards: Hazard[]): string {
  return [...hazards.map((h) => HAZARD_TEXT[h]), GOVERNS].join(' ');
}

// ---------------------------------------------------------------------------------------------
// The catalogue
// ---------------------------------------------------------------------------------------------

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
      "The unit is closer to the floor than the model's minimum mounting height, putting moving louvres and air outlets within reach and spoiling the air throw.",
    unitKinds: ['wall_mounted', 'floor_ceiling'],
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
    caution: caution('lifting', 'electrical', 'refrigerant'),
    needsCeilingAccess: false,
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
    caution: caution('lifting', 'electrical', 'refrigerant'),
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
    caution: caution('lifting', 'overhead'),
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
    caution: caution('overhead'),
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
      limit: { from: 'code', key: 'irc.working_space.min_depth' },
    },
    fixGuidance:
      'Clear or enlarge the space in front of the service side to at least the code depth by moving stored material or other services; change framing only with the designer.',
    caution: caution('overhead'),
    needsCeilingAccess: true,
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
      'Drain hangers are farther apart than the job allows, or the drain is tied to other services instead of its own hangers, so it sags and holds water.',
    unitKinds: ALL_KINDS,
    defaultSeverity: 'major',
    trade: 'mechanical',
    measuredRule: {
      measure: 'Longest span between drain pipe supports',
      quantity: 'length',
      comparison: 'at_most',
      limit: { from: 'job', key: 'max_hanger_rod_spacing' },
    },
    fixGuidance:
      'Add hangers so no span is longer than the job spacing, with the drain on its own supports and its fall kept.',
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
    title: 'Trap where none belongs',
    description:
      'The drain has a trap, or a dip that acts as one, where the manual says the drain must run free, so it air-locks, gurgles or overflows the pan.',
    unitKinds: UNTRAPPED,
    defaultSeverity: 'major',
    trade: 'mechanical',
    fixGuidance:
      'Take out the trap or dip and give the drain a continuous fall; any trap the plumbing design needs belongs where that design shows it, not at the unit.',
    caution: caution('overhead'),
    needsCeilingAccess: true,
  },
  {
    code: 'DR-08',
    group: 'drainage',
    title: 'Trap or check valve missing',
    description:
      'A drain the manual says needs a trap (the fan pulls air through the pan) or a check valve (a pumped drain joining a shared main) has none, so air is drawn up the drain or other units\' water runs back into this one.',
    unitKinds: [...PUMPED, 'ahu_coil_kit'],
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
    caution: caution('lifting', 'overhead'),
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
    caution: caution('electrical', 'overhead'),
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
    fixGuidance:
      'Rework the opening or its sleeve so it falls to the outside by the amount the manual shows, then seal it again inside and out.',
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
    caution: caution('overhead'),
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
    caution: caution('electrical'),
    needsCeilingAccess: false,
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
      measure: 'Longest span between supports on horizontal copper of the smaller sizes (up to 1-1/4 in)',
      quantity: 'length',
      comparison: 'at_most',
      limit: { from: 'code', key: 'imc.copper_support.horizontal_small' },
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
