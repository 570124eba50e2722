// ARIA attributes that react-native-web renders on the DOM but React Native's own prop types do
// not list (aria-level, aria-current, aria-invalid, aria-describedby, aria-required). Spread the
// result onto a View/Text/TextInput; native platforms ignore unknown props.
export interface ExtraAria {
  level?: number;
  current?: 'page' | 'true' | boolean;
  invalid?: boolean;
  describedBy?: string;
  required?: boolean;
}

export function extraAria({ level, current, invalid, describedBy, required }: ExtraAria): object {
  const out: Record<string, unknown> = {};
  if (level != null) out['aria-level'] = level;
  if (current != null && current !== false) out['aria-current'] = current;
  if (invalid) out['aria-invalid'] = true;
  if (describedBy) out['aria-describedby'] = describedBy;
  if (required) out['aria-required'] = true;
  return out;
}

let seq = 0;
/** A DOM id unique within the page, for aria-describedby links between fields and their errors. */
export function nextId(prefix: string): string {
  seq += 1;
  return `${prefix}-${seq}`;
}
