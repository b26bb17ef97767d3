import { AppText } from '../ui/AppText';
import type { PlanFilePickerProps } from './PlanFilePicker.types';

/** The native build has no file chooser package: plans are uploaded from a browser. Same props as the web version. */
export function PlanFilePicker({ testID }: PlanFilePickerProps) {
  return (
    <AppText variant="small" muted testID={testID}>
      Upload plans from Trimout in a browser.
    </AppText>
  );
}
