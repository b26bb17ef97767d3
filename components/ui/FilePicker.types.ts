export interface FilePickerProps {
  label: string;
  /** e.g. ".csv,text/csv" */
  accept: string;
  onText: (text: string, fileName: string) => void;
  onError?: (message: string) => void;
  testID?: string;
}
