import type { Ref } from 'react';

export interface SelectOption {
  value: string;
  label: string;
}

export interface SelectProps {
  label: string;
  value: string;
  options: readonly SelectOption[];
  onChange: (value: string) => void;
  /** Shown as the first, empty choice (value ''). Leave out to require a choice. */
  placeholder?: string;
  error?: string;
  hint?: string;
  testID?: string;
  disabled?: boolean;
  /** Drop the bottom margin (inline in a row of filters). */
  compact?: boolean;
  /** What a form focuses when this choice is in error (react-hook-form's field ref). */
  fieldRef?: Ref<{ focus: () => void }>;
}
