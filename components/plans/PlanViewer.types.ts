import type { FindingStatus, Severity } from '../../shared/words';

export interface PlanFindingPin {
  id: string;
  label: string;
  /** The number shown inside the pin. */
  number: number;
  code: string;
  status: Exclude<FindingStatus, 'voided'>;
  severity: Severity;
  overdue: boolean;
  x: number;
  y: number;
}

export interface PlanUnitPin {
  id: string;
  tag: string;
  x: number;
  y: number;
}

export interface PlanViewerProps {
  imageUri: string;
  /** The stored image's pixels (its aspect is what matters). */
  planWidth: number;
  planHeight: number;
  findings: readonly PlanFindingPin[];
  units: readonly PlanUnitPin[];
  /** Placing a pin: a tap on the plan calls onPlace; pins do not take taps meanwhile. */
  placing: boolean;
  onPlace: (pin: { x: number; y: number }) => void;
  onOpenFinding: (id: string) => void;
  onOpenUnit: (id: string) => void;
  /** The finding or unit being placed or just placed: drawn with a dashed ring. */
  selectedId?: string;
  wide: boolean;
  windowHeight: number;
}
