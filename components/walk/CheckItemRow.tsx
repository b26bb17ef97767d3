import { forwardRef, useState } from 'react';
import { Pressable, StyleSheet, View } from 'react-native';
import type { LimitResolver } from '../../shared/calc/rules';
import type { UnitSystem } from '../../shared/catalogue/types';
import type { CatalogueItemDto } from '../../shared/schemas/setup';
import type { CheckMark } from '../../shared/words';
import { colors, fonts, radius, space, touchTarget } from '../theme';
import { AppText } from '../ui/AppText';
import { Button } from '../ui/Button';
import { ItemCaution } from './ItemCaution';
import { MeasuredField } from './MeasuredField';
import type { MeasurementView } from './measure';
import { SeverityMark } from './SeverityMark';
import { usePointerWords } from '../ui/usePointerWords';

const STATE_TEXT: Record<CheckMark | 'none', string> = {
  none: 'Not marked',
  ok: '✓ OK',
  defect: '✗ Defect',
  not_applicable: '– Not applicable',
};

/**
 * One catalogue item of a unit check on one line: its code and title (a tap opens the guidance
 * and the caution), its state, and one tap for OK and one for Defect. A measured item keeps its
 * field on the line below (the value is the answer); a defect offers "Log finding" at once.
 * Not applicable is in the opened part: it is the rare answer.
 */
export const CheckItemRow = forwardRef<View, {
  item: CatalogueItemDto;
  mark: CheckMark | undefined;
  onMark: (m: CheckMark | undefined) => void;
  measuredText: string;
  onMeasured: (text: string, view: MeasurementView) => void;
  resolve: LimitResolver;
  system: UnitSystem;
  /** Findings logged for this item on this visit ("#214"). */
  logged: readonly string[];
  /** Findings not resolved yet on this unit and item ("#12"): the item cannot be marked OK. */
  unresolved: readonly string[];
  /** A refusal to show on the item (e.g. OK over an open finding). */
  error?: string | null;
  onLogFinding: () => void;
  readOnly?: boolean;
}>(function CheckItemRow(
  { item, mark, onMark, measuredText, onMeasured, resolve, system, logged, unresolved, error, onLogFinding, readOnly },
  ref,
) {
  const [open, setOpen] = useState(false);
  const { press } = usePointerWords();
  const testID = `check-item-${item.code}`;
  const name = `${item.code} ${item.title}`;
  const toggle = (m: CheckMark) => onMark(mark === m ? undefined : m);
  return (
    <View ref={ref} style={[styles.row, mark === 'defect' ? styles.rowDefect : mark ? styles.rowDone : null]} testID={testID}>
      <View style={styles.line}>
        <Pressable
          accessibilityRole="button"
          accessibilityState={{ expanded: open }}
          // Named by what it shows (code, caution mark, state, title); aria-expanded says it opens the guidance.
          testID={`${testID}-expand`}
          onPress={() => setOpen((o) => !o)}
          style={styles.name}
        >
          <AppText variant="small" muted numberOfLines={1}>
            {item.code}
            {item.caution ? ' · ⚠' : ''} ·{' '}
            <AppText variant="small" testID={`${testID}-state`} style={mark === 'defect' ? styles.stateDefect : mark === 'ok' ? styles.stateOk : null}>
              {STATE_TEXT[mark ?? 'none']}
            </AppText>
          </AppText>
          <AppText variant="label" numberOfLines={open ? undefined : 2}>
            {item.title} <AppText variant="label" style={styles.more}>{open ? '▴' : '▾'}</AppText>
          </AppText>
        </Pressable>
        <View style={styles.quick} role="radiogroup" aria-label={`Mark ${name}`}>
          <QuickMark on={mark === 'ok'} kind="ok" label={`OK: ${name}`} testID={`${testID}-mark-ok`} disabled={readOnly} onPress={() => toggle('ok')} />
          <QuickMark on={mark === 'defect'} kind="defect" label={`Defect: ${name}`} testID={`${testID}-mark-defect`} disabled={readOnly} onPress={() => toggle('defect')} />
        </View>
      </View>
      {item.measuredRule ? (
        <MeasuredField rule={item.measuredRule} text={measuredText} onChangeText={onMeasured} resolve={resolve} system={system} testID={`${testID}-measured`} />
      ) : null}
      {unresolved.length ? (
        <AppText variant="small" testID={`${testID}-unresolved`} style={styles.unresolved}>
          {`${unresolved.join(', ')} still open on this item: it cannot be marked OK until ${unresolved.length === 1 ? 'it is' : 'they are'} closed.`}
        </AppText>
      ) : null}
      {error ? (
        <AppText variant="small" role="alert" testID={`${testID}-error`} style={styles.error}>
          {error}
        </AppText>
      ) : null}
      {mark === 'defect' && !readOnly ? (
        <View style={styles.defect}>
          {logged.length ? (
            <AppText variant="label" testID={`${testID}-logged`} style={{ color: colors.good, flexShrink: 1 }}>
              ✓ Logged {logged.join(', ')}
            </AppText>
          ) : (
            <View style={styles.defaultSeverity}>
              <AppText variant="small" muted>
                Usually
              </AppText>
              <SeverityMark severity={item.defaultSeverity} />
            </View>
          )}
          <Button
            label={logged.length ? 'Log another' : 'Log finding'}
            tone={logged.length ? 'secondary' : 'danger'}
            testID={`${testID}-log`}
            accessibilityLabel={`${logged.length ? 'Log another finding' : 'Log finding'}: ${name}`}
            onPress={onLogFinding}
          />
        </View>
      ) : null}
      {open ? (
        <View style={styles.detail} testID={`${testID}-detail`}>
          <AppText variant="small">{item.description}</AppText>
          {item.caution ? <ItemCaution text={item.caution} initiallyOpen testID={`${testID}-caution`} /> : null}
          {!readOnly ? (
            <Pressable
              role="radio"
              aria-checked={mark === 'not_applicable'}
              aria-label={`Not applicable: ${name}`}
              testID={`${testID}-mark-not_applicable`}
              onPress={() => toggle('not_applicable')}
              style={[styles.na, mark === 'not_applicable' ? styles.naOn : null]}
            >
              <AppText style={mark === 'not_applicable' ? styles.naTextOn : styles.naText}>
                {mark === 'not_applicable' ? `– Not applicable (${press} to clear)` : 'Not applicable to this unit'}
              </AppText>
            </Pressable>
          ) : null}
        </View>
      ) : null}
    </View>
  );
});

function QuickMark({ on, kind, label, testID, disabled, onPress }: { on: boolean; kind: 'ok' | 'defect'; label: string; testID: string; disabled?: boolean; onPress: () => void }) {
  const fill = kind === 'ok' ? colors.good : colors.danger;
  return (
    <Pressable
      role="radio"
      aria-checked={on}
      aria-label={label}
      accessibilityState={{ checked: on, disabled }}
      disabled={disabled}
      testID={testID}
      onPress={onPress}
      style={[styles.mark, kind === 'defect' ? styles.markWide : null, on ? { backgroundColor: fill, borderColor: fill } : null]}
    >
      <AppText style={[styles.markText, on ? styles.markTextOn : null]}>{kind === 'ok' ? (on ? '✓ OK' : 'OK') : on ? '✗ Defect' : 'Defect'}</AppText>
    </Pressable>
  );
}

const styles = StyleSheet.create({
  row: {
    backgroundColor: colors.surface,
    borderRadius: radius.md,
    borderWidth: 1,
    borderColor: colors.line,
    borderLeftWidth: 5,
    borderLeftColor: colors.line,
    paddingLeft: space.sm,
    paddingRight: space.xs,
    paddingVertical: space.xs,
    gap: space.sm,
  },
  rowDone: { borderLeftColor: colors.good },
  rowDefect: { borderLeftColor: colors.danger },
  line: { flexDirection: 'row', alignItems: 'center', gap: space.xs },
  name: { flex: 1, minHeight: touchTarget, justifyContent: 'center', paddingVertical: 2 },
  more: { color: colors.spruce },
  stateOk: { color: colors.good, fontFamily: fonts.bold },
  stateDefect: { color: colors.danger, fontFamily: fonts.bold },
  quick: { flexDirection: 'row', gap: space.xs },
  mark: {
    minWidth: 52,
    minHeight: touchTarget + 4,
    paddingHorizontal: space.xs,
    alignItems: 'center',
    justifyContent: 'center',
    borderRadius: radius.md,
    borderWidth: 1.5,
    borderColor: colors.line,
    backgroundColor: colors.paper,
  },
  markWide: { minWidth: 68 },
  markText: { fontFamily: fonts.regular, fontSize: 16, color: colors.ink },
  markTextOn: { color: '#FFFFFF', fontFamily: fonts.bold },
  unresolved: { color: '#5A3B00', backgroundColor: colors.ochreSoft, borderRadius: radius.sm, padding: space.xs },
  error: { color: colors.danger, fontFamily: fonts.bold },
  defect: { flexDirection: 'row', flexWrap: 'wrap', alignItems: 'center', justifyContent: 'space-between', gap: space.sm, paddingRight: space.xs },
  defaultSeverity: { flexDirection: 'row', alignItems: 'center', gap: space.sm },
  detail: { gap: space.sm, paddingRight: space.xs, paddingBottom: space.xs },
  na: {
    minHeight: touchTarget,
    justifyContent: 'center',
    paddingHorizontal: space.md,
    borderRadius: radius.md,
    borderWidth: 1.5,
    borderColor: colors.line,
    backgroundColor: colors.paper,
  },
  naOn: { backgroundColor: colors.inkMuted, borderColor: colors.inkMuted },
  naText: { color: colors.ink },
  naTextOn: { color: '#FFFFFF', fontFamily: fonts.bold },
});
