import { Pressable, StyleSheet, View } from 'react-native';
import type { LimitResolver } from '../../shared/calc/rules';
import type { UnitSystem } from '../../shared/catalogue/types';
import type { CatalogueItemDto } from '../../shared/schemas/setup';
import { CHECK_MARK_LABELS, type CheckMark } from '../../shared/words';
import { colors, fonts, radius, space, touchTarget } from '../theme';
import { AppText } from '../ui/AppText';
import { Button } from '../ui/Button';
import { ItemCaution } from './ItemCaution';
import { MeasuredField } from './MeasuredField';
import type { MeasurementView } from './measure';
import { SeverityMark } from './SeverityMark';

const MARK_LOOK: Record<CheckMark, { glyph: string; short: string; bg: string; fg: string }> = {
  ok: { glyph: '✓', short: 'OK', bg: colors.good, fg: '#FFFFFF' },
  defect: { glyph: '✗', short: 'Defect', bg: colors.danger, fg: '#FFFFFF' },
  not_applicable: { glyph: '–', short: 'N/A', bg: colors.inkMuted, fg: '#FFFFFF' },
};
const MARKS: CheckMark[] = ['ok', 'defect', 'not_applicable'];

/** Three big buttons: OK, Defect, N/A; the chosen one is filled and carries its glyph. */
export function MarkButtons({ value, onChange, testID, disabled }: { value: CheckMark | undefined; onChange: (m: CheckMark) => void; testID: string; disabled?: boolean }) {
  return (
    <View style={styles.marks} role="radiogroup" accessibilityLabel="Mark">
      {MARKS.map((m) => {
        const on = value === m;
        const look = MARK_LOOK[m];
        return (
          <Pressable
            key={m}
            role="radio"
            aria-checked={on}
            aria-label={CHECK_MARK_LABELS[m]}
            accessibilityState={{ checked: on, disabled }}
            disabled={disabled}
            testID={`${testID}-${m}`}
            onPress={() => onChange(m)}
            style={[styles.mark, on ? { backgroundColor: look.bg, borderColor: look.bg } : null]}
          >
            <AppText style={[styles.markText, on ? { color: look.fg, fontFamily: fonts.bold } : null]}>
              {on ? `${look.glyph} ` : ''}
              {look.short}
            </AppText>
          </Pressable>
        );
      })}
    </View>
  );
}

/**
 * One catalogue item in a unit check: what to look at, the caution where the work is hazardous,
 * the three marks, the measured value with its verdict, and "Log finding" for a defect.
 */
export function CheckItemCard({
  item,
  mark,
  onMark,
  measuredText,
  onMeasured,
  resolve,
  system,
  logged,
  onLogFinding,
  readOnly,
}: {
  item: CatalogueItemDto;
  mark: CheckMark | undefined;
  onMark: (m: CheckMark) => void;
  measuredText: string;
  onMeasured: (text: string, view: MeasurementView) => void;
  resolve: LimitResolver;
  system: UnitSystem;
  /** Findings logged for this item on this visit ("#214"). */
  logged: readonly string[];
  onLogFinding: () => void;
  readOnly?: boolean;
}) {
  const testID = `check-item-${item.code}`;
  return (
    <View style={[styles.card, mark === 'defect' ? styles.cardDefect : mark ? styles.cardDone : null]} testID={testID}>
      <View style={styles.head}>
        <AppText variant="small" muted>
          {item.code}
        </AppText>
        <AppText variant="heading">{item.title}</AppText>
        <AppText variant="small" muted numberOfLines={3}>
          {item.description}
        </AppText>
      </View>
      {item.caution ? <ItemCaution text={item.caution} testID={`${testID}-caution`} /> : null}
      {item.measuredRule ? (
        <MeasuredField
          rule={item.measuredRule}
          text={measuredText}
          onChangeText={onMeasured}
          resolve={resolve}
          system={system}
          testID={`${testID}-measured`}
        />
      ) : null}
      <MarkButtons value={mark} onChange={onMark} testID={`${testID}-mark`} disabled={readOnly} />
      {mark === 'defect' && !readOnly ? (
        <View style={styles.defect}>
          {logged.length ? (
            <AppText variant="label" testID={`${testID}-logged`} style={{ color: colors.good }}>
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
            label={logged.length ? 'Log another finding' : 'Log finding'}
            tone={logged.length ? 'secondary' : 'danger'}
            testID={`${testID}-log`}
            onPress={onLogFinding}
          />
        </View>
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({
  card: {
    backgroundColor: colors.surface,
    borderRadius: radius.lg,
    borderWidth: 1,
    borderColor: colors.line,
    borderLeftWidth: 5,
    borderLeftColor: colors.line,
    padding: space.md,
    gap: space.md,
  },
  cardDone: { borderLeftColor: colors.good },
  cardDefect: { borderLeftColor: colors.danger },
  head: { gap: 2 },
  marks: { flexDirection: 'row', gap: space.sm },
  mark: {
    flex: 1,
    minHeight: touchTarget + 8,
    alignItems: 'center',
    justifyContent: 'center',
    borderRadius: radius.md,
    borderWidth: 1.5,
    borderColor: colors.line,
    backgroundColor: colors.paper,
  },
  markText: { fontFamily: fonts.regular, fontSize: 17, color: colors.ink },
  defect: { gap: space.sm },
  defaultSeverity: { flexDirection: 'row', alignItems: 'center', gap: space.sm },
});
