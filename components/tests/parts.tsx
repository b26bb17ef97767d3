import type { ReactNode } from 'react';
import { type Control, type FieldValues, type Path, useController } from 'react-hook-form';
import { StyleSheet, View } from 'react-native';
import type { TestRecordDto, TestRecordKind } from '../../shared/schemas/testRecords';
import { colors, space } from '../theme';
import { AppText } from '../ui/AppText';
import { Badge } from '../ui/Badge';
import { useFieldLabel } from '../ui/FormBanner';
import { Segmented } from '../ui/Segmented';
import { ItemCaution } from '../walk/ItemCaution';
import { RESULT_WORDS } from './format';

/**
 * The hazards of each kind of record, named first so the closed caution lists them. ItemCaution
 * adds the deferral (manual, local codes, licensed practice) and that Trimout does not certify.
 */
export const TEST_CAUTIONS: Record<TestRecordKind, string> = {
  pressure:
    'Nitrogen pressure: use a regulator and a relief valve, never exceed the test pressure the manufacturer states, and keep people clear of joints under test. ' +
    'Brazing: braze with nitrogen flowing, keep a fire watch and a hot-work permit where the site asks for one.',
  evacuation:
    'Refrigerant: never vent it; recover it with certified equipment. Flammable A2L refrigerants: no ignition sources near the work, ventilate, use tools rated for them. ' +
    'Electrical: the vacuum pump and the unit are isolated and locked out as the work requires.',
  charge:
    'Refrigerant: handle and weigh it only with the training your jurisdiction requires; wear gloves and eye protection against liquid refrigerant. ' +
    'Flammable A2L refrigerants: no ignition sources, ventilate, follow the charge limits for the rooms served.',
  drain:
    'Electrical: a pump or float switch is proven with the unit powered; open only the panels the manual allows and keep hands clear of live parts. ' +
    'Overhead work: use a ladder or lift rated for the job, and keep water away from electrical parts.',
  startup:
    'Electrical start-up: live parts; only qualified people energise the system, with covers on and lock-out where work continues. ' +
    'Refrigerant: flammable A2L refrigerants need leak detection and ventilation where the manual requires them.',
};

/** The usual caution for a kind of record (open on forms, where the work is about to happen). */
export function TestCaution({ kind, initiallyOpen = false, testID }: { kind: TestRecordKind; initiallyOpen?: boolean; testID?: string }) {
  return <ItemCaution text={TEST_CAUTIONS[kind]} initiallyOpen={initiallyOpen} testID={testID} />;
}

/** Passed / Failed / Recorded, word first (colour only supports it). */
export function ResultBadge({ result, testID }: { result: TestRecordDto['result']; testID?: string }) {
  return <Badge label={`${result === 'passed' ? '✓ ' : result === 'failed' ? '✗ ' : ''}${RESULT_WORDS[result]}`} tone={result === 'passed' ? 'good' : result === 'failed' ? 'bad' : 'neutral'} testID={testID} />;
}

/** Witnessed (locked) / Waiting for a witness / Corrected. */
export function WitnessBadge({ record, testID }: { record: Pick<TestRecordDto, 'locked' | 'current'>; testID?: string }) {
  if (!record.current) return <Badge label="Corrected by a later record" tone="warn" testID={testID} />;
  return record.locked ? <Badge label="Witnessed · locked" tone="info" testID={testID} /> : <Badge label="Waiting for a witness" tone="warn" testID={testID} />;
}

/**
 * A yes / no answer held as true / false (null: not answered yet), with its error under it. The
 * drain test's and the start-up's observations.
 */
export function FormYesNo<T extends FieldValues>({
  control,
  name,
  label,
  testID,
  onChosen,
}: {
  // eslint-disable-next-line @typescript-eslint/no-explicit-any -- a field reads values only, any parsed output will do
  control: Control<T, any, any>;
  name: Path<T>;
  label: string;
  testID: string;
  onChosen?: (value: boolean) => void;
}) {
  const { field, fieldState } = useController({ control, name });
  useFieldLabel(control, name, label);
  const value = field.value === true ? 'yes' : field.value === false ? 'no' : ('' as 'yes');
  return (
    <View>
      <Segmented<'yes' | 'no'>
        label={label}
        testID={testID}
        value={value}
        options={[
          { value: 'yes', label: 'Yes' },
          { value: 'no', label: 'No' },
        ]}
        onChange={(v) => {
          field.onChange(v === 'yes');
          onChosen?.(v === 'yes');
        }}
      />
      {fieldState.error?.message ? (
        <AppText variant="small" role="alert" style={styles.error} testID={`${testID}-error`}>
          {fieldState.error.message}
        </AppText>
      ) : null}
    </View>
  );
}

/** A label and its value on one line (wraps on a phone). */
export function Row({ label, children, testID }: { label: string; children: ReactNode; testID?: string }) {
  return (
    <View style={styles.row} testID={testID}>
      <AppText variant="label" muted style={styles.rowLabel}>
        {label}
      </AppText>
      <View style={styles.rowValue}>{typeof children === 'string' ? <AppText>{children}</AppText> : children}</View>
    </View>
  );
}

const styles = StyleSheet.create({
  error: { color: colors.danger, marginTop: -space.md },
  row: { flexDirection: 'row', gap: space.md, paddingVertical: 2, flexWrap: 'wrap' },
  rowLabel: { width: 150 },
  rowValue: { flex: 1, minWidth: 160 },
});
