import type { PlanFile } from '../queries/plans';

export interface PlanFilePickerProps {
  label: string;
  onPick: (file: PlanFile) => void;
  onError?: (message: string) => void;
  disabled?: boolean;
  busy?: boolean;
  testID?: string;
}

/** What the chooser offers; the server decides from the bytes anyway. */
export const PLAN_ACCEPT = 'image/png,image/jpeg,application/pdf,.png,.jpg,.jpeg,.pdf';
/** The server's limit (server/services/plans.ts PLAN_MAX_BYTES), checked first to save a long upload. */
export const PLAN_MAX_BYTES = 15 * 1024 * 1024;
