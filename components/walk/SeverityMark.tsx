import { StyleSheet, View } from 'react-native';
import { SEVERITY_LABELS, type Severity } from '../../shared/words';
import { colors, radius, severityColors, space } from '../theme';
import { AppText } from '../ui/AppText';

/**
 * Each severity has its own shape as well as its colour and its word, so it reads in glare, in
 * greyscale and for colour-blind eyes: critical a diamond, major a triangle, minor a circle.
 */
export function SeverityShape({ severity, size = 14 }: { severity: Severity; size?: number }) {
  const c = severityColors[severity].bg;
  if (severity === 'critical') {
    const side = size * 0.72;
    return (
      <View style={{ width: size, height: size, alignItems: 'center', justifyContent: 'center' }} aria-hidden>
        <View style={{ width: side, height: side, backgroundColor: c, transform: [{ rotate: '45deg' }], borderWidth: 1, borderColor: colors.ink }} />
      </View>
    );
  }
  if (severity === 'major') {
    return (
      <View style={{ width: size, height: size, alignItems: 'center', justifyContent: 'flex-end' }} aria-hidden>
        <View
          style={{
            width: 0,
            height: 0,
            borderLeftWidth: size / 2,
            borderRightWidth: size / 2,
            borderBottomWidth: size * 0.9,
            borderLeftColor: 'transparent',
            borderRightColor: 'transparent',
            borderBottomColor: '#B07A1E',
          }}
        />
      </View>
    );
  }
  return (
    <View style={{ width: size, height: size, alignItems: 'center', justifyContent: 'center' }} aria-hidden>
      <View style={{ width: size * 0.8, height: size * 0.8, borderRadius: size, backgroundColor: colors.spruce, borderWidth: 2, borderColor: c }} />
    </View>
  );
}

/** Shape + word on the severity's tint: "◆ Critical". */
export function SeverityMark({ severity, testID, suffix }: { severity: Severity; testID?: string; suffix?: string }) {
  const c = severityColors[severity];
  return (
    <View style={[styles.mark, { backgroundColor: c.bg }]} testID={testID} accessibilityLabel={`Severity ${SEVERITY_LABELS[severity]}`}>
      <View style={styles.shapeWell}>
        <SeverityShape severity={severity} size={12} />
      </View>
      <AppText variant="label" style={{ color: c.fg }}>
        {SEVERITY_LABELS[severity]}
        {suffix ? ` ${suffix}` : ''}
      </AppText>
    </View>
  );
}

const styles = StyleSheet.create({
  mark: {
    flexDirection: 'row',
    alignItems: 'center',
    alignSelf: 'flex-start',
    gap: space.xs,
    borderRadius: radius.sm,
    paddingHorizontal: space.sm,
    paddingVertical: 2,
  },
  shapeWell: { backgroundColor: colors.surface, borderRadius: radius.sm, padding: 2 },
});
