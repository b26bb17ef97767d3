import type { UploadPhoto } from '../queries/findings';

/** A photo chosen for a finding, with a local preview uri. */
export interface PickedPhoto extends UploadPhoto {
  /** Stable key for lists. */
  key: string;
}

export interface PhotoPickerProps {
  label: string;
  /** Called with the photos chosen in one go. */
  onPick: (photos: PickedPhoto[]) => void;
  onError?: (message: string) => void;
  disabled?: boolean;
  testID?: string;
}

let counter = 0;
/** A key unique within this page's life. */
export function photoKey(): string {
  counter += 1;
  return `photo-${Date.now().toString(36)}-${counter}`;
}
