/**
 * How a pin looks on a plan: Trimout's own scheme, on the palette of components/theme.ts.
 * Two separate channels, so neither depends on colour alone:
 * - status → fill: open = brick (needs fixing), fix submitted = signal blue (waiting for the
 *   inspector), closed = pale spruce with a spruce outline (done, kept faint);
 * - severity → shape: critical = diamond, major = square, minor = circle.
 * An overdue finding gets an ochre halo. Units are hollow spruce rings with a centre dot.
 * The finding's number is written inside every finding pin, so a pin can be named aloud.
 */
import type { FindingStatus, Severity } from '../../shared/words';
import { colors } from '../theme';

export type PinShape = 'diamond' | 'square' | 'circle';

export const SEVERITY_SHAPE: Record<Severity, PinShape> = {
  critical: 'diamond',
  major: 'square',
  minor: 'circle',
};

export const STATUS_PIN: Record<Exclude<FindingStatus, 'voided'>, { fill: string; stroke: string; text: string; label: string }> = {
  open: { fill: colors.danger, stroke: '#FFFFFF', text: '#FFFFFF', label: 'Open' },
  fix_submitted: { fill: colors.focus, stroke: '#FFFFFF', text: '#FFFFFF', label: 'Fix submitted' },
  closed: { fill: colors.spruceSoft, stroke: colors.spruce, text: colors.spruce, label: 'Closed' },
};

export const OVERDUE_HALO = colors.ochre;
export const UNIT_PIN = { stroke: colors.spruce, fill: '#FFFFFF' } as const;

export const SEVERITY_LABEL: Record<Severity, string> = { critical: 'Critical', major: 'Major', minor: 'Minor' };

/** The pin's spoken name: "Finding #12, DR-03, open, major, overdue". */
export function findingPinLabel(f: { label: string; code: string; status: FindingStatus; severity: Severity; overdue: boolean }): string {
  const status = f.status === 'voided' ? 'voided' : STATUS_PIN[f.status].label.toLowerCase();
  return `Finding ${f.label}, ${f.code}, ${status}, ${f.severity}${f.overdue ? ', overdue' : ''}`;
}
