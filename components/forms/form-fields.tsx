// react-hook-form bindings for Keel's fields. Values follow the shared zod schemas: text stays
// text; numbers are numbers (the typed text is kept so "0." can be typed); id pickers give
// numbers or null.
import { useEffect, useState } from 'react';
import { Controller, type Control, type FieldPath, type FieldValues } from 'react-hook-form';
import { SelectField, type SelectOption } from '../select-field';
import { TextField, type TextFieldProps } from '../text-field';

interface Bound<T extends FieldValues> {
  control: Control<T>;
  name: FieldPath<T>;
}

export function FormTextField<T extends FieldValues>({ control, name, ...rest }: Bound<T> & Omit<TextFieldProps, 'value' | 'onChangeText'>) {
  return (
    <Controller
      control={control}
      name={name}
      render={({ field, fieldState }) => (
        <TextField
          {...rest}
          ref={field.ref}
          value={field.value == null ? '' : String(field.value)}
          onChangeText={field.onChange}
          onBlur={field.onBlur}
          error={fieldState.error?.message}
        />
      )}
    />
  );
}

function toNumber(text: string): number | undefined {
  const t = text.trim().replace(',', '.');
  if (t === '') return undefined;
  // NaN (not undefined) for junk, so the schema reports "… must be a number" rather than "required".
  return /^[-+]?(\d+\.?\d*|\.\d+)([eE][-+]?\d+)?$/.test(t) ? Number(t) : Number.NaN;
}

function NumberInput({ value, onChange, onBlur, inputRef, error, ...rest }: Omit<TextFieldProps, 'value' | 'onChangeText' | 'onBlur'> & {
  value: unknown;
  onChange: (v: number | undefined) => void;
  onBlur: () => void;
  inputRef: React.Ref<never>;
  error?: string;
}) {
  const [text, setText] = useState(typeof value === 'number' && Number.isFinite(value) ? String(value) : '');
  // Follow outside changes (form reset, editing another record) without fighting the typist.
  useEffect(() => {
    const current = toNumber(text);
    if (typeof value === 'number' && Number.isFinite(value) && value !== current) setText(String(value));
    if (value === undefined && current !== undefined && !Number.isNaN(current)) setText('');
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [value]);
  return (
    <TextField
      {...rest}
      ref={inputRef}
      mono
      inputMode="decimal"
      keyboardType="decimal-pad"
      value={text}
      onChangeText={(t) => {
        setText(t);
        onChange(toNumber(t));
      }}
      onBlur={onBlur}
      error={error}
    />
  );
}

export function FormNumberField<T extends FieldValues>({ control, name, ...rest }: Bound<T> & Omit<TextFieldProps, 'value' | 'onChangeText'>) {
  return (
    <Controller
      control={control}
      name={name}
      render={({ field, fieldState }) => (
        <NumberInput
          {...rest}
          inputRef={field.ref as React.Ref<never>}
          value={field.value}
          onChange={field.onChange}
          onBlur={field.onBlur}
          error={fieldState.error?.message}
        />
      )}
    />
  );
}

export interface FormSelectFieldProps<T extends FieldValues> extends Bound<T> {
  label: string;
  options: SelectOption[];
  /** Values are ids: convert the chosen option back to a number. */
  numeric?: boolean;
  /** Offer "None" (value null), for optional references. */
  noneLabel?: string;
  placeholder?: string;
  required?: boolean;
  testID?: string;
}

const NONE = '__none__';

export function FormSelectField<T extends FieldValues>({ control, name, options, numeric, noneLabel, ...rest }: FormSelectFieldProps<T>) {
  const all = noneLabel ? [{ value: NONE, label: noneLabel }, ...options] : options;
  return (
    <Controller
      control={control}
      name={name}
      render={({ field, fieldState }) => (
        <SelectField
          {...rest}
          options={all}
          value={field.value === null ? (noneLabel ? NONE : '') : field.value === undefined ? '' : String(field.value)}
          onChange={(v) => field.onChange(v === NONE ? null : numeric ? Number(v) : v)}
          onBlur={field.onBlur}
          // Nothing chosen gives the schema's "… must be a number"; say what to do instead.
          error={
            fieldState.error
              ? field.value === undefined || field.value === ''
                ? `Choose the ${rest.label.toLowerCase()}`
                : fieldState.error.message
              : undefined
          }
        />
      )}
    />
  );
}
