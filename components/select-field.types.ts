export interface SelectOption {
  value: string;
  label: string;
}

export interface SelectFieldProps {
  /** Visible label and the control's accessible name. */
  label: string;
  /** Accessible name when the visible label is not specific enough ("Role for Ada Moor"). */
  accessibleLabel?: string;
  value: string | null | undefined;
  options: SelectOption[];
  onChange: (value: string) => void;
  onBlur?: () => void;
  error?: string;
  /** Shown as the first, unselectable choice when nothing is chosen yet. */
  placeholder?: string;
  required?: boolean;
  disabled?: boolean;
  testID?: string;
}
