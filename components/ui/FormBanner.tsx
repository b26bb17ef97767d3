/**
 * The one message above a form's button after a submit that did not go: it names the fields whose
 * messages sit at them ("Check 2 fields: Severity, Due date."), says what no field shows (a
 * message for the whole form, a field not on screen) and the refused write's own sentence.
 * The shared form fields (FormFields.tsx) tell it their labels, so no form lists them twice.
 */
import { useEffect } from 'react';
import { type Control, type FieldValues, useFormState } from 'react-hook-form';
import { StyleSheet } from 'react-native';
import { FIELDS_MARKED } from '../api/writeErrors';
import { colors } from '../theme';
import { AppText } from './AppText';
import { Notice } from './Notice';

// A form's field labels by name, in the order the fields were first shown (the reading order).
const labelsByForm = new WeakMap<object, Map<string, string>>();

/** Called by every shared form field: the banner can then name it. */
// eslint-disable-next-line @typescript-eslint/no-explicit-any -- any form: only its identity is used
export function useFieldLabel<T extends FieldValues>(control: Control<T, any, any>, name: string, label: string) {
  useEffect(() => {
    let labels = labelsByForm.get(control);
    if (!labels) labelsByForm.set(control, (labels = new Map()));
    labels.set(name, label);
    return () => {
      if (labels.get(name) === label) labels.delete(name);
    };
  }, [control, name, label]);
}

interface Flat {
  name: string;
  message: string;
}

/** react-hook-form nests errors by path (`reassign.reason`, `limits.x.value`): one entry per message. */
function flatten(errors: unknown, prefix = ''): Flat[] {
  if (!errors || typeof errors !== 'object') return [];
  const out: Flat[] = [];
  const e = errors as Record<string, unknown>;
  if (prefix && typeof e.message === 'string' && e.message !== '') out.push({ name: prefix, message: e.message });
  for (const [key, value] of Object.entries(e)) {
    if (key === 'ref' || key === 'message' || key === 'type' || key === 'types' || (!prefix && key === 'root')) continue;
    if (value && typeof value === 'object') out.push(...flatten(value, prefix ? `${prefix}.${key}` : key));
  }
  return out;
}

export function checkFieldsSentence(labels: readonly string[]): string {
  return `Check ${labels.length} field${labels.length === 1 ? '' : 's'}: ${labels.join(', ')}.`;
}

export interface BannerWords {
  /** "Check 2 fields: Severity, Due date." or null. */
  fields: string | null;
  /** Messages no field on screen shows, then the form's own message. */
  others: string[];
}

/** What the banner says, from the form's errors and its fields' labels. */
export function bannerWords(errors: unknown, labels: ReadonlyMap<string, string> | undefined): BannerWords {
  const flat = flatten(errors);
  const order = labels ? [...labels.keys()] : [];
  const named = flat.filter((f) => labels?.has(f.name)).sort((a, b) => order.indexOf(a.name) - order.indexOf(b.name));
  const unnamed = flat.filter((f) => !labels?.has(f.name)).map((f) => f.message);
  const rootMessage = (errors as { root?: { message?: unknown } } | undefined)?.root?.message;
  const root = typeof rootMessage === 'string' && rootMessage !== '' && !(named.length > 0 && rootMessage === FIELDS_MARKED) ? rootMessage : null;
  // "Note (optional)", "Due on (YYYY-MM-DD)": the banner names the field, the field says the rest.
  const labelsNamed = [...new Set(named.map((f) => labels!.get(f.name)!.replace(/\s*\([^)]*\)\s*$/, '')))];
  return { fields: labelsNamed.length ? checkFieldsSentence(labelsNamed) : null, others: [...new Set([...unnamed, ...(root ? [root] : [])])] };
}

/** Shown only while the form has an error; role=alert (Notice), so it is announced when it appears. */
// eslint-disable-next-line @typescript-eslint/no-explicit-any -- any form's parsed output will do
export function FormBanner<T extends FieldValues>({ control, testID, title }: { control: Control<T, any, any>; testID: string; title?: string }) {
  const { errors } = useFormState({ control });
  const words = bannerWords(errors, labelsByForm.get(control));
  if (!words.fields && words.others.length === 0) return null;
  return (
    <Notice tone="error" title={title} testID={testID}>
      {words.fields ? <AppText style={styles.text} testID={`${testID}-fields`}>{words.fields}</AppText> : null}
      {words.others.map((m) => (
        <AppText key={m} style={styles.text}>
          {m}
        </AppText>
      ))}
    </Notice>
  );
}

const styles = StyleSheet.create({ text: { color: colors.danger } });
