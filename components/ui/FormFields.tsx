/**
 * Form fields bound to react-hook-form: a labelled text box, a choice list and a quantity
 * typed with its unit. Each shows its own error (schema or server) under the field.
 */
import { useState, type Ref } from 'react';
import { Controller, type Control, type FieldValues, type Path } from 'react-hook-form';
import { StyleSheet, View, type TextInput, type TextInputProps } from 'react-native';
import { space } from '../theme';
import { Segmented } from './Segmented';
import { Select, type SelectOption } from './Select';
import { TextField } from './TextField';

interface Base<T extends FieldValues> {
  control: Control<T>;
  name: Path<T>;
  label: string;
  testID: string;
  hint?: string;
}

/** Text; an emptied optional field is sent as null (cleared), not as "". */
export function FormText<T extends FieldValues>({
  control,
  name,
  label,
  testID,
  hint,
  nullable,
  inputRef,
  ...input
}: Base<T> & { nullable?: boolean; inputRef?: Ref<TextInput> } & Omit<TextInputProps, 'value' | 'onChangeText' | 'testID'>) {
  return (
    <Controller
      control={control}
      name={name}
      render={({ field, fieldState }) => (
        <TextField
          {...input}
          ref={inputRef}
          testID={testID}
          label={label}
          hint={hint}
          value={typeof field.value === 'string' ? field.value : ''}
          onChangeText={(t) => field.onChange(nullable && t.trim() === '' ? null : t)}
          onBlur={field.onBlur}
          error={fieldState.error?.message}
        />
      )}
    />
  );
}

export function FormSelect<T extends FieldValues>({
  control,
  name,
  label,
  testID,
  hint,
  options,
  placeholder,
  nullable,
}: Base<T> & { options: readonly SelectOption[]; placeholder?: string; nullable?: boolean }) {
  return (
    <Controller
      control={control}
      name={name}
      render={({ field, fieldState }) => (
        <Select
          testID={testID}
          label={label}
          hint={hint}
          value={typeof field.value === 'string' ? field.value : ''}
          options={options}
          placeholder={placeholder}
          onChange={(v) => field.onChange(v === '' ? (nullable ? null : undefined) : v)}
          error={fieldState.error?.message}
        />
      )}
    />
  );
}

/** A bare number typed here gets the unit chosen beside it ("10" + ft → "10 ft"). */
export function withUnit(text: string, unit: string): string {
  const t = text.trim();
  return /^\d+(\.\d+)?$|^\.\d+$/.test(t) ? `${t} ${unit}` : t;
}

/**
 * A quantity typed the way the trade writes it ("10' 6\"", "3.2 m", "38 lb"), with a unit
 * picker for a bare number. The form holds the text as sent; empty clears (null).
 */
export function FormQuantity<T extends FieldValues>({
  control,
  name,
  label,
  testID,
  hint,
  units,
  defaultUnit,
  placeholder,
}: Base<T> & { units: readonly string[]; defaultUnit: string; placeholder?: string }) {
  const [unit, setUnit] = useState(defaultUnit);
  const [raw, setRaw] = useState<string | null>(null);
  return (
    <Controller
      control={control}
      name={name}
      render={({ field, fieldState }) => {
        const toValue = (text: string, u: string) => (text.trim() === '' ? null : withUnit(text, u));
        const current = typeof field.value === 'string' ? field.value : null;
        // What was typed, while it still stands for the form's value (a reset clears it).
        const shown = raw !== null && toValue(raw, unit) === current ? raw : (current ?? '');
        const send = (text: string, u: string) => field.onChange(toValue(text, u));
        return (
          <View style={styles.quantity}>
            <View style={styles.grow}>
              <TextField
                testID={testID}
                label={label}
                hint={hint ?? `Type a number and pick its unit, or type it with its unit.`}
                placeholder={placeholder}
                value={shown}
                onChangeText={(t) => {
                  setRaw(t);
                  send(t, unit);
                }}
                onBlur={field.onBlur}
                error={fieldState.error?.message}
              />
            </View>
            <Segmented
              label="Unit"
              testID={`${testID}-unit`}
              value={unit}
              options={units.map((u) => ({ value: u, label: u }))}
              onChange={(u) => {
                setUnit(u);
                send(shown, u);
              }}
            />
          </View>
        );
      }}
    />
  );
}

const styles = StyleSheet.create({
  quantity: { flexDirection: 'row', flexWrap: 'wrap', gap: space.md, alignItems: 'flex-start' },
  grow: { flexGrow: 1, flexBasis: 200 },
});
