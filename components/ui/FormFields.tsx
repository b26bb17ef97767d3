/**
 * Form fields bound to react-hook-form: a labelled text box, a choice list, a short choice shown
 * at once, a quantity typed with its unit, a severity, a measured value and a photo list. Each
 * shows its own error (schema or server) under the field.
 */
import { useState, type Ref } from 'react';
import {
  type Control,
  type FieldError,
  type FieldErrors,
  type FieldValues,
  type Path,
  type Resolver,
  type ResolverOptions,
  type UseFormSetError,
  useController,
} from 'react-hook-form';
import { StyleSheet, View, type TextInput, type TextInputProps } from 'react-native';
import type { LimitResolver } from '../../shared/calc/rules';
import type { MeasuredRule, UnitSystem } from '../../shared/catalogue/types';
import type { TextLimit } from '../../shared/schemas/fields';
import type { Severity } from '../../shared/words';
import { ApiError } from '../api/client';
import { CameraCapture } from '../findings/CameraCapture';
import { PhotoPicker } from '../findings/PhotoPicker';
import type { PickedPhoto } from '../findings/PhotoPicker.types';
import { PhotoStrip } from '../findings/PhotoStrip';
import { SeverityPicker } from '../findings/SeverityPicker';
import { colors, space } from '../theme';
import { MeasuredField } from '../walk/MeasuredField';
import { AppText } from './AppText';
import { Chips } from './Chips';
import { useFieldLabel } from './FormBanner';
import { Segmented } from './Segmented';
import { Select, type SelectOption } from './Select';
import { TextField } from './TextField';

interface Base<T extends FieldValues> {
  // A field reads and sets the form's values, never its parsed output, so any output type will do.
  // eslint-disable-next-line @typescript-eslint/no-explicit-any
  control: Control<T, any, any>;
  name: Path<T>;
  label: string;
  testID: string;
  hint?: string;
}

/**
 * Text; an emptied optional field is sent as null (cleared), not as "". A text with a length limit
 * takes the schema's `limit` (never maxLength, which cuts a paste without a word): the box counts
 * down near it, and text past it is kept and marked with the schema's own message.
 */
export function FormText<T extends FieldValues>({
  control,
  name,
  label,
  testID,
  hint,
  nullable,
  inputRef,
  limit,
  ...input
}: Base<T> & { nullable?: boolean; inputRef?: Ref<TextInput>; compact?: boolean; limit?: TextLimit } & Omit<
    TextInputProps,
    'value' | 'onChangeText' | 'testID' | 'maxLength'
  >) {
  const { field, fieldState } = useController({ control, name });
  useFieldLabel(control, name, label);
  return (
    <TextField
      {...input}
      limit={limit}
      // The form's ref too: a refused submit focuses (and the browser scrolls to) the first field in error.
      ref={(el: TextInput | null) => {
        field.ref(el);
        if (typeof inputRef === 'function') inputRef(el);
        else if (inputRef) (inputRef as { current: TextInput | null }).current = el;
      }}
      testID={testID}
      label={label}
      hint={hint}
      value={typeof field.value === 'string' ? field.value : ''}
      onChangeText={(t) => field.onChange(nullable && t.trim() === '' ? null : t)}
      onBlur={field.onBlur}
      error={fieldState.error?.message}
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
  compact,
  onChosen,
}: Base<T> & {
  options: readonly SelectOption[];
  placeholder?: string;
  nullable?: boolean;
  compact?: boolean;
  /** Called after the user picks a value (to fill in what follows from it). */
  onChosen?: (value: string) => void;
}) {
  const { field, fieldState } = useController({ control, name });
  useFieldLabel(control, name, label);
  return (
    <Select
      testID={testID}
      label={label}
      hint={hint}
      value={typeof field.value === 'string' ? field.value : ''}
      options={options}
      placeholder={placeholder}
      onChange={(v) => {
        field.onChange(v === '' ? (nullable ? null : undefined) : v);
        onChosen?.(v);
      }}
      error={fieldState.error?.message}
      compact={compact}
      // A refused submit focuses the first field in error, choices too.
      fieldRef={field.ref}
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
  const { field, fieldState } = useController({ control, name });
  useFieldLabel(control, name, label);
  const toValue = (text: string, u: string) => (text.trim() === '' ? null : withUnit(text, u));
  const current = typeof field.value === 'string' ? field.value : null;
  // What was typed, while it still stands for the form's value (a reset clears it).
  const shown = raw !== null && toValue(raw, unit) === current ? raw : (current ?? '');
  const send = (text: string, u: string) => field.onChange(toValue(text, u));
  return (
    <View style={styles.quantity}>
      <View style={styles.grow}>
        <TextField
          ref={field.ref}
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
}

/** A short choice shown all at once (Segmented), with its error under it. */
export function FormSegmented<T extends FieldValues, V extends string>({
  control,
  name,
  label,
  testID,
  options,
  onChosen,
}: Base<T> & { options: readonly { value: V; label: string }[]; onChosen?: (value: V) => void }) {
  const { field, fieldState } = useController({ control, name });
  useFieldLabel(control, name, label);
  return (
    <View>
      <Segmented<V>
        label={label}
        testID={testID}
        value={field.value as V}
        options={options}
        onChange={(v) => {
          field.onChange(v);
          onChosen?.(v);
        }}
      />
      <FieldMessage error={fieldState.error} testID={`${testID}-error`} />
    </View>
  );
}

/** Several choices at once (trades, unit kinds), held as a list of the chosen values. */
export function FormChips<T extends FieldValues, V extends string>({
  control,
  name,
  label,
  testID,
  options,
}: Base<T> & { options: readonly { value: V; label: string }[] }) {
  const { field, fieldState } = useController({ control, name });
  useFieldLabel(control, name, label);
  return (
    <Chips<V>
      label={label}
      testID={testID}
      values={Array.isArray(field.value) ? (field.value as V[]) : []}
      options={options}
      onChange={field.onChange}
      error={fieldState.error?.message}
    />
  );
}

/** The three severities as big choices (shape, word and colour). */
export function FormSeverity<T extends FieldValues>({
  control,
  name,
  testID,
  onChosen,
}: Omit<Base<T>, 'label'> & { onChosen?: (value: Severity) => void }) {
  const { field, fieldState } = useController({ control, name });
  useFieldLabel(control, name, 'Severity');
  return (
    <View>
      <SeverityPicker
        testID={testID}
        value={field.value as Severity}
        onChange={(s) => {
          field.onChange(s);
          onChosen?.(s);
        }}
      />
      <FieldMessage error={fieldState.error} testID={`${testID}-error`} />
    </View>
  );
}

/**
 * A measured value typed the way the trade writes it, with its verdict against the unit's
 * limits at once (MeasuredField). An empty value is held as null (nothing measured).
 */
export function FormMeasured<T extends FieldValues>({
  control,
  name,
  testID,
  rule,
  resolve,
  system,
}: Omit<Base<T>, 'label'> & { rule: MeasuredRule; resolve: LimitResolver; system: UnitSystem }) {
  const { field, fieldState } = useController({ control, name });
  useFieldLabel(control, name, 'Measured value');
  return (
    <View>
      <MeasuredField
        rule={rule}
        text={typeof field.value === 'string' ? field.value : ''}
        onChangeText={(t) => field.onChange(t.trim() === '' ? null : t)}
        resolve={resolve}
        system={system}
        testID={testID}
      />
      <FieldMessage error={fieldState.error} testID={`${testID}-error`} />
    </View>
  );
}

/**
 * Photos the form sends as files beside its JSON: thumbnails (tap to enlarge, remove), a file
 * picker and the camera. More than `max` are not taken (the `tooMany` message says so).
 * Test ids: `<testID>-photos`, `-files`, `-camera`, `-photos-error`.
 */
export function FormPhotos<T extends FieldValues>({
  control,
  name,
  label,
  testID,
  max,
  tooMany,
  photoLabel = 'Photo',
}: Base<T> & { max: number; tooMany: string; photoLabel?: string }) {
  const [problem, setProblem] = useState<string | null>(null);
  const { field, fieldState } = useController({ control, name });
  useFieldLabel(control, name, label);
  const photos: PickedPhoto[] = Array.isArray(field.value) ? (field.value as PickedPhoto[]) : [];
  const add = (more: PickedPhoto[]) => {
    const room = Math.max(max - photos.length, 0);
    setProblem(more.length > room ? tooMany : null);
    field.onChange([...photos, ...more.slice(0, room)]);
  };
  const message = fieldState.error?.message ?? problem;
  return (
    <View style={styles.photos}>
      <AppText variant="label">
        {label} ({photos.length} of at most {max})
      </AppText>
      <PhotoStrip
        testID={`${testID}-photos`}
        photos={photos.map((p, i) => ({ key: p.key, thumbUri: p.uri, fullUri: p.uri, label: `${photoLabel} ${i + 1}` }))}
        onRemove={(key) => {
          setProblem(null);
          field.onChange(photos.filter((p) => p.key !== key));
        }}
      />
      <PhotoPicker label="Add photos from files" testID={`${testID}-files`} disabled={photos.length >= max} onPick={add} onError={setProblem} />
      <CameraCapture testID={`${testID}-camera`} disabled={photos.length >= max} onPhoto={(p) => add([p])} />
      {message ? (
        <AppText variant="small" role="alert" style={styles.error} testID={`${testID}-photos-error`}>
          {message}
        </AppText>
      ) : null}
    </View>
  );
}

function FieldMessage({ error, testID }: { error: FieldError | undefined; testID: string }) {
  if (!error?.message) return null;
  return (
    <AppText variant="small" role="alert" style={styles.error} testID={testID}>
      {error.message}
    </AppText>
  );
}

/**
 * The resolver of a request schema for a form that also holds what the request does not carry
 * in its JSON (photos go as files beside it). Those keys are set aside while the schema checks
 * the rest (request schemas are strict), each checked by its own function, and handed back with
 * the parsed values.
 */
export function withFormOnly<I extends FieldValues, C, O extends FieldValues, X extends FieldValues>(
  resolver: Resolver<I, C, O>,
  checks: { [K in keyof X]: (value: X[K]) => string | undefined },
): Resolver<I & X, C, O & X> {
  return async (values, context, options) => {
    const rest: Record<string, unknown> = { ...values };
    const extra: Record<string, unknown> = {};
    const extraErrors: Record<string, FieldError> = {};
    for (const key of Object.keys(checks) as (keyof X & string)[]) {
      extra[key] = rest[key];
      delete rest[key];
      const message = checks[key](extra[key] as X[typeof key]);
      if (message) extraErrors[key] = { type: 'custom', message };
    }
    const result = await resolver(rest as I, context, options as unknown as ResolverOptions<I>);
    const errors = { ...result.errors, ...extraErrors } as FieldErrors<I & X>;
    if (Object.keys(errors).length > 0) return { values: {}, errors };
    return { values: { ...(result.values as O), ...extra } as O & X, errors: {} };
  };
}

/**
 * The resolver of a request schema for a form that holds some of its values the way they are
 * typed (a number as text, an optional group of fields left empty): `prepare` turns the form's
 * values into the request, which the schema then checks. Field paths stay the same, so each
 * message lands on the field it names.
 */
export function preparedFor<F extends FieldValues, I extends FieldValues, C, O extends FieldValues>(
  resolver: Resolver<I, C, O>,
  prepare: (values: F) => I,
): Resolver<F, C, O> {
  return async (values, context, options) => {
    const result = await resolver(prepare(values), context, options as unknown as ResolverOptions<I>);
    return result as unknown as Awaited<ReturnType<Resolver<F, C, O>>>;
  };
}

/**
 * Puts a refused write's field messages (ApiError.fields, keyed by the body's path, e.g.
 * `reassign.reason`) on the form's fields of those names. True when any landed, so the message
 * above the form can point at them.
 */
export function setServerFieldErrors<T extends FieldValues>(err: unknown, setError: UseFormSetError<T>, names: readonly Path<T>[]): boolean {
  if (!(err instanceof ApiError)) return false;
  let placed = false;
  for (const [field, message] of Object.entries(err.fields)) {
    if ((names as readonly string[]).includes(field)) {
      setError(field as Path<T>, { message });
      placed = true;
    }
  }
  return placed;
}

const styles = StyleSheet.create({
  photos: { gap: space.sm },
  error: { color: colors.danger },
  quantity: { flexDirection: 'row', flexWrap: 'wrap', gap: space.md, alignItems: 'flex-start' },
  grow: { flexGrow: 1, flexBasis: 200 },
});
