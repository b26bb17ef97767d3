export interface ImageCodeInputProps {
  /** The code read from the chosen image, or null when none was found. */
  onResult: (text: string | null) => void;
  disabled?: boolean;
  testID?: string;
}
