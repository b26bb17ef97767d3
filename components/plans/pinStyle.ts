/**
 * How a pin looks on a plan: Trimout's own scheme, on the palette of components/theme.ts.
 * Two separate channels, so neither depends on colour alone:
 * - status → fill: open = brick (needs fixing), fix submitted = signal blue (waiting for the
 *   inspector), closed = pale spruce with a spruce outline (done, kept faint);
 * - severity → shape: critical = diamond, major = square, minor = circle.
 * An overdue finding gets an ochre halo. Units are hollow spruce rings with a centre dot.
 * The finding's number is written inside every finding pin, so a pin can be named aloud.
 */
import { FINDING_STATUS_LABELS, type FindingStatus, type Severity } from '../../shared/words';
import { defectCodeWords } from '../../shared/rules/somethingElse';
import { colors } from '../theme';

export type PinShape = 'diamond' | 'square' | 'circle';

export const SEVERITY_SHAPE: Record<Severity, PinShape> = {
  critical: 'diamond',
  major: 'square',
  minor: 'circle',
};

/** Colours only: the words are FINDING_STATUS_LABELS (shared/words.ts). */
export const STATUS_PIN: Record<Exclude<FindingStatus, 'voided'>, { fill: string; stroke: string; text: string }> = {
  open: { fill: colors.danger, stroke: '#FFFFFF', text: '#FFFFFF' },
  fix_submitted: { fill: colors.focus, stroke: '#FFFFFF', text: '#FFFFFF' },
  closed: { fill: colors.spruceSoft, stroke: colors.spruce, text: colors.spruce },
};

export const OVERDUE_HALO = colors.ochre;
export const UNIT_PIN = { stroke: colors.spruce, fill: '#FFFFFF' } as const;

/** The pin's spoken name: "Finding #12, DR-03, open, major, overdue". */
export function findingPinLabel(f: { label: string; code: string; status: FindingStatus; severity: Severity; overdue: boolean }): string {
  const status = FINDING_STATUS_LABELS[f.status].toLowerCase();
  return `Finding ${f.label}, ${defectCodeWords(f.code)}, ${status}, ${f.severity}${f.overdue ? ', overdue' : ''}`;
}
