import { useMemo } from 'react';
import { Pressable, StyleSheet, View } from 'react-native';
import type { LimitResolver } from '../../shared/calc/rules';
import type { MeasuredRule, UnitSystem } from '../../shared/catalogue/types';
import { colors, fonts, radius, space, touchTarget } from '../theme';
import { AppText } from '../ui/AppText';
import { TextField } from '../ui/TextField';
import { describeLimit, describeMargin, measure, type MeasurementView } from './measure';

const EXAMPLES: Record<string, string> = {
  length: `e.g. 4' 10-1/2", 58.5 in, 1486 mm`,
  slope: 'e.g. 1/4 in/ft, 2%',
  angle: 'e.g. 20°',
  mass: 'e.g. 38 lb, 17.2 kg',
  area: 'e.g. 120 sq ft',
  volume: 'e.g. 800 cu ft',
  capacity: 'e.g. 3 tons, 36000 Btu/h',
};

/**
 * One measured item of a unit check: the value typed the way the trade writes it, and at once
 * the verdict (pass / fail / limit not set), the limit, the margin and where the limit comes from.
 * A malformed text shows the parser's message under the field. Yes/no items get two big buttons.
 */
export function MeasuredField({
  rule,
  text,
  onChangeText,
  resolve,
  system,
  testID,
}: {
  rule: MeasuredRule;
  text: string;
  /** The new text and its evaluation (so the caller can propose the defect on a fail). */
  onChangeText: (text: string, view: MeasurementView) => void;
  resolve: LimitResolver;
  system: UnitSystem;
  testID: string;
}) {
  const view = useMemo(() => measure(rule, text, resolve, system), [rule, text, resolve, system]);
  const change = (t: string) => onChangeText(t, measure(rule, t, resolve, system));
  return (
    <View style={styles.wrap} testID={testID}>
      {rule.quantity === 'boolean' ? (
        <View style={styles.yesNo}>
          <AppText variant="label">{rule.measure}</AppText>
          <View style={styles.yesNoRow} role="radiogroup" accessibilityLabel={rule.measure}>
            {(['yes', 'no'] as const).map((answer) => {
              const on = text.trim().toLowerCase() === answer;
              return (
                <Pressable
                  key={answer}
                  role="radio"
                  aria-checked={on}
                  accessibilityState={{ checked: on }}
                  testID={`${testID}-${answer}`}
                  onPress={() => change(on ? '' : answer)}
                  style={[styles.yesNoButton, on ? styles.yesNoOn : null]}
                >
                  <AppText style={[styles.yesNoText, on ? styles.yesNoTextOn : null]}>{answer === 'yes' ? 'Yes' : 'No'}</AppText>
                </Pressable>
              );
            })}
          </View>
        </View>
      ) : (
        <TextField
          label={rule.measure}
          testID={`${testID}-input`}
          value={text}
          onChangeText={change}
          placeholder={EXAMPLES[rule.quantity] ?? ''}
          autoCapitalize="none"
          autoCorrect={false}
          inputMode="text"
          error={view.kind === 'parse_error' ? view.error : undefined}
          compact
        />
      )}
      <Verdict view={view} rule={rule} system={system} testID={testID} />
    </View>
  );
}

function Verdict({ view, rule, system, testID }: { view: MeasurementView; rule: MeasuredRule; system: UnitSystem; testID: string }) {
  const r = view.result;
  const limit = describeLimit(rule, r, system);
  const source = r.limitSource;
  if (r.status === 'limit_not_set' || r.status === 'invalid') {
    return (
      <View style={[styles.box, styles.unset]} testID={`${testID}-verdict`}>
        <AppText variant="label" testID={`${testID}-status`}>
          ? Limit not set
        </AppText>
        <AppText variant="small">{r.message}</AppText>
      </View>
    );
  }
  if (view.kind !== 'result') {
    return (
      <View style={styles.hint} testID={`${testID}-verdict`}>
        <AppText variant="small" muted testID={`${testID}-limit`}>
          {limit ? `Limit: ${limit}` : 'Limit: see the source'}
          {source ? ` · ${source}` : ''}
        </AppText>
      </View>
    );
  }
  const pass = r.status === 'pass';
  const margin = describeMargin(rule, r, system);
  return (
    <View style={[styles.box, pass ? styles.pass : styles.fail]} testID={`${testID}-verdict`} role={pass ? undefined : 'alert'}>
      <View style={styles.verdictHead}>
        <View style={[styles.stamp, pass ? styles.stampPass : styles.stampFail]}>
          <AppText variant="label" style={styles.stampText} testID={`${testID}-status`}>
            {pass ? '✓ PASS' : '✗ FAIL'}
          </AppText>
        </View>
        <AppText variant="heading" testID={`${testID}-measured`}>
          {view.display}
        </AppText>
      </View>
      {limit ? (
        <AppText variant="small" testID={`${testID}-limit`}>
          Limit: {limit}
        </AppText>
      ) : null}
      {margin ? (
        <AppText variant="small" testID={`${testID}-margin`} style={pass ? null : styles.failText}>
          Margin: {margin}
        </AppText>
      ) : null}
      <AppText variant="small" muted testID={`${testID}-source`}>
        Source: {source}
      </AppText>
    </View>
  );
}

const styles = StyleSheet.create({
  wrap: { gap: space.sm },
  yesNo: { gap: space.xs },
  yesNoRow: { flexDirection: 'row', gap: space.sm },
  yesNoButton: {
    flex: 1,
    minHeight: touchTarget + 4,
    alignItems: 'center',
    justifyContent: 'center',
    borderRadius: radius.md,
    borderWidth: 1.5,
    borderColor: colors.line,
    backgroundColor: colors.surface,
  },
  yesNoOn: { borderColor: colors.spruce, backgroundColor: colors.spruceSoft },
  yesNoText: { fontFamily: fonts.regular, fontSize: 17 },
  yesNoTextOn: { fontFamily: fonts.bold, color: colors.spruce },
  hint: { paddingHorizontal: 2 },
  box: { borderRadius: radius.md, borderLeftWidth: 4, padding: space.md, gap: 2 },
  pass: { backgroundColor: colors.goodSoft, borderLeftColor: colors.good },
  fail: { backgroundColor: colors.dangerSoft, borderLeftColor: colors.danger },
  unset: { backgroundColor: colors.ochreSoft, borderLeftColor: colors.ochre },
  verdictHead: { flexDirection: 'row', alignItems: 'center', gap: space.sm, flexWrap: 'wrap' },
  stamp: { borderRadius: radius.sm, paddingHorizontal: space.sm, paddingVertical: 2 },
  stampPass: { backgroundColor: colors.good },
  stampFail: { backgroundColor: colors.danger },
  stampText: { color: '#FFFFFF' },
  failText: { color: colors.danger, fontFamily: fonts.bold },
});
