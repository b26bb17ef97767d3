/**
 * The product's vocabulary, in one place, used by the screens and the server alike.
 * Words follow the product brief: job, level, space, system, unit, walk, unit check,
 * finding, fix, re-inspection, levels board, digest.
 */

export const ROLES = ['gc_manager', 'inspector', 'subcontractor'] as const;
export type Role = (typeof ROLES)[number];
export const ROLE_LABELS: Record<Role, string> = {
  gc_manager: 'GC manager',
  inspector: 'Inspector',
  subcontractor: 'Subcontractor',
};

/** Classification used by acceptance-sampling standards (critical / major / minor). */
export const SEVERITIES = ['critical', 'major', 'minor'] as const;
export type Severity = (typeof SEVERITIES)[number];
export const SEVERITY_LABELS: Record<Severity, string> = {
  critical: 'Critical',
  major: 'Major',
  minor: 'Minor',
};

export const FINDING_STATUSES = ['open', 'fix_submitted', 'closed', 'voided'] as const;
export type FindingStatus = (typeof FINDING_STATUSES)[number];
export const FINDING_STATUS_LABELS: Record<FindingStatus, string> = {
  open: 'Open',
  fix_submitted: 'Fix submitted',
  closed: 'Closed',
  voided: 'Voided',
};

export const CHECK_MARKS = ['ok', 'defect', 'not_applicable'] as const;
export type CheckMark = (typeof CHECK_MARKS)[number];
export const CHECK_MARK_LABELS: Record<CheckMark, string> = {
  ok: 'OK',
  defect: 'Defect',
  not_applicable: 'Not applicable',
};

/**
 * Indoor unit kinds. Kinds are data: a catalogue item lists the kinds it applies to by key.
 * `family` groups kinds that share most checks.
 */
export const UNIT_KINDS = [
  { key: 'cassette_4way', label: 'Ceiling cassette, four-way', family: 'cassette' },
  { key: 'cassette_2way', label: 'Ceiling cassette, two-way', family: 'cassette' },
  { key: 'cassette_compact', label: 'Ceiling cassette, compact four-way', family: 'cassette' },
  { key: 'wall_mounted', label: 'Wall-mounted', family: 'wall' },
  { key: 'floor_console', label: 'Floor console', family: 'floor' },
  { key: 'floor_ceiling', label: 'Floor/ceiling', family: 'floor_ceiling' },
  { key: 'ducted_low', label: 'Ducted, low static', family: 'ducted' },
  { key: 'ducted_high', label: 'Ducted, high static', family: 'ducted' },
  { key: 'ducted_very_high', label: 'Ducted, very high static', family: 'ducted' },
  { key: 'ahu_coil_kit', label: 'Air-handler coil kit', family: 'ahu_kit' },
] as const;
export type UnitKindKey = (typeof UNIT_KINDS)[number]['key'];
export const UNIT_KIND_KEYS = UNIT_KINDS.map((k) => k.key) as unknown as readonly [
  UnitKindKey,
  ...UnitKindKey[],
];
export const UNIT_KIND_LABELS = Object.fromEntries(UNIT_KINDS.map((k) => [k.key, k.label])) as Record<UnitKindKey, string>;
/** A unit kind in words; a key this build does not know (sent by a newer server) shows as it is. */
export function unitKindLabel(key: string): string {
  return (UNIT_KIND_LABELS as Record<string, string | undefined>)[key] ?? key;
}

/** Trades a company can cover on a job. */
export const TRADES = [
  { key: 'general', label: 'General contracting' },
  { key: 'mechanical', label: 'Mechanical' },
  { key: 'electrical', label: 'Electrical' },
  { key: 'controls', label: 'Controls' },
  { key: 'ceilings', label: 'Ceilings' },
  { key: 'insulation', label: 'Insulation' },
  { key: 'plumbing', label: 'Plumbing' },
  { key: 'drywall', label: 'Drywall and framing' },
  { key: 'roofing', label: 'Roofing' },
] as const;
export type TradeKey = (typeof TRADES)[number]['key'];
export const TRADE_KEYS = TRADES.map((t) => t.key) as unknown as readonly [TradeKey, ...TradeKey[]];
export const TRADE_LABELS = Object.fromEntries(TRADES.map((t) => [t.key, t.label])) as Record<TradeKey, string>;
/** A trade in words; an unknown key shows as it is. */
export function tradeLabel(key: string): string {
  return (TRADE_LABELS as Record<string, string | undefined>)[key] ?? key;
}

export const REFRIGERANTS = ['R-410A', 'R-32', 'R-454B'] as const;
export type Refrigerant = (typeof REFRIGERANTS)[number];

/** A finding whose defect is not in the catalogue (the job's "other" defect type, with its own title). */
export const SOMETHING_ELSE = {
  label: 'Something else',
  /** The button that opens it, beside a catalogue. */
  action: 'Something else (not in the catalogue)',
  titleLabel: 'What is wrong',
} as const;

/** What a finding's photo shows (PhotoDto.stage), as the finding screen labels it. */
export const PHOTO_STAGE_LABELS = {
  finding: 'Defect photo',
  fix: 'Fix photo',
  reinspection: 'Re-inspection photo',
} as const satisfies Record<'finding' | 'fix' | 'reinspection', string>;

/** The finding screen's side-by-side of the latest fix and the latest re-inspection. */
export const FIX_AND_REINSPECTION_WORDS = {
  heading: 'Fix and re-inspection',
  fix: 'Fix (latest)',
  reinspection: 'Re-inspection (latest)',
  noFixPhoto: 'No fix photo.',
  noReinspectionPhoto: 'No re-inspection photo.',
  newMeasurement: 'New measurement',
  addPhotos: 'Add photos of the defect',
} as const;
