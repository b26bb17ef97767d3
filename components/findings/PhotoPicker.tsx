import { AppText } from '../ui/AppText';
import type { PhotoPickerProps } from './PhotoPicker.types';

/**
 * In the native app there is no file chooser package in this build: photos come from the camera
 * (CameraCapture) on the same form. Same props as the web version.
 */
export function PhotoPicker({ testID }: PhotoPickerProps) {
  return (
    <AppText variant="small" muted testID={testID}>
      Take the photos with the camera below.
    </AppText>
  );
}
