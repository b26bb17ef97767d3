export interface QrCameraProps {
  /** Called with each code read (the screen decides what it means). */
  onCode: (text: string) => void;
  onClose: () => void;
  testID?: string;
}
