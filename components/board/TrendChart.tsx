import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import Svg, { G, Line, Path, Rect, Text as SvgText } from 'react-native-svg';
import type { TrendPoint } from '../../shared/schemas/board';
import { formatDay } from '../findings/due';
import { colors, fonts, space } from '../theme';
import { AppText } from '../ui/AppText';

const HEIGHT = 200;
const PAD = { left: 40, right: 16, top: 12, bottom: 30 };
const FIX_COLOUR = '#B07A1E';

/** A round top for the y axis (1, 2, 5 × 10^n) and its ticks. */
export function niceTicks(max: number): number[] {
  if (max <= 0) return [0, 1];
  const rough = max / 4;
  const mag = 10 ** Math.floor(Math.log10(rough));
  const step = [1, 2, 5, 10].map((m) => m * mag).find((s) => s >= rough) ?? 10 * mag;
  const stepInt = Math.max(1, Math.round(step));
  const ticks: number[] = [];
  for (let v = 0; v < max + stepInt; v += stepInt) ticks.push(v);
  return ticks;
}

/**
 * The chart in words, for screen readers and anyone who would rather read it: where the open
 * count started and ended, its highest day, and the fixes waiting at the end.
 */
export function trendSummary(points: readonly TrendPoint[], what = 'Open findings'): string {
  if (points.length === 0) return `${what}: no days to show yet.`;
  const first = points[0]!;
  const last = points[points.length - 1]!;
  if (points.length === 1) return `${what} on ${formatDay(first.date)}: ${first.open}; ${first.fixSubmitted} with a fix submitted.`;
  const peak = points.reduce((p, c) => (c.open > p.open ? c : p), first);
  const change = last.open - first.open;
  const direction = change === 0 ? 'no change' : change > 0 ? `up ${change}` : `down ${-change}`;
  return (
    `${what} went from ${first.open} on ${formatDay(first.date)} to ${last.open} on ${formatDay(last.date)} (${direction}); ` +
    `highest ${peak.open} on ${formatDay(peak.date)}. ${last.fixSubmitted} with a fix submitted at the end.`
  );
}

/** Short date for an axis label: "12 Nov". */
function shortDay(date: string): string {
  const [y, m, d] = date.split('-').map(Number);
  return new Date(Date.UTC(y!, m! - 1, d!)).toLocaleDateString(undefined, { timeZone: 'UTC', day: 'numeric', month: 'short' });
}

/**
 * Open findings over time as a filled line, fixes submitted as a dashed line, on a y axis of
 * counts and an x axis of days. Drawn with react-native-svg; the summary under it says the same.
 */
export function TrendChart({ points, title = 'Open findings over time', testID = 'trend' }: { points: readonly TrendPoint[]; title?: string; testID?: string }) {
  const [width, setWidth] = useState(0);
  const summary = trendSummary(points);
  const max = Math.max(0, ...points.map((p) => Math.max(p.open, p.fixSubmitted)));
  const ticks = niceTicks(max);
  const top = ticks[ticks.length - 1]!;
  const plotW = Math.max(10, width - PAD.left - PAD.right);
  const plotH = HEIGHT - PAD.top - PAD.bottom;
  const x = (i: number) => PAD.left + (points.length <= 1 ? plotW / 2 : (i / (points.length - 1)) * plotW);
  const y = (v: number) => PAD.top + plotH - (v / top) * plotH;
  const line = (key: 'open' | 'fixSubmitted') => points.map((p, i) => `${i === 0 ? 'M' : 'L'}${x(i).toFixed(1)},${y(p[key]).toFixed(1)}`).join(' ');
  const area = points.length > 0 ? `${line('open')} L${x(points.length - 1).toFixed(1)},${y(0)} L${x(0).toFixed(1)},${y(0)} Z` : '';
  // At most about one date label per 90 px, always the first and the last.
  const every = Math.max(1, Math.ceil(points.length / Math.max(2, Math.floor(plotW / 90))));
  const labelled = points.map((_, i) => i).filter((i) => i === 0 || i === points.length - 1 || (i % every === 0 && points.length - 1 - i >= every / 2));

  return (
    <View style={styles.wrap} testID={testID}>
      <AppText variant="title" role="heading">
        {title}
      </AppText>
      <View style={styles.legend} aria-hidden>
        <View style={styles.key}>
          <View style={[styles.swatch, { backgroundColor: colors.spruce }]} />
          <AppText variant="small">Open</AppText>
        </View>
        <View style={styles.key}>
          <View style={[styles.swatchDash, { borderColor: FIX_COLOUR }]} />
          <AppText variant="small">Fix submitted</AppText>
        </View>
      </View>
      {points.length === 0 ? null : (
        <View onLayout={(e) => setWidth(e.nativeEvent.layout.width)} style={styles.plot} role="img" aria-label={summary} testID={`${testID}-chart`}>
          {width > 0 ? (
            <Svg width={width} height={HEIGHT}>
              <Rect x={PAD.left} y={PAD.top} width={plotW} height={plotH} fill={colors.surface} />
              <G>
                {ticks.map((t) => (
                  <G key={t}>
                    <Line x1={PAD.left} x2={PAD.left + plotW} y1={y(t)} y2={y(t)} stroke={colors.line} strokeWidth={1} />
                    <SvgText x={PAD.left - 6} y={y(t) + 4} fontSize={11} fontFamily={fonts.regular} fill={colors.inkMuted} textAnchor="end">
                      {String(t)}
                    </SvgText>
                  </G>
                ))}
              </G>
              <Line x1={PAD.left} x2={PAD.left} y1={PAD.top} y2={PAD.top + plotH} stroke={colors.inkMuted} strokeWidth={1} />
              <Line x1={PAD.left} x2={PAD.left + plotW} y1={PAD.top + plotH} y2={PAD.top + plotH} stroke={colors.inkMuted} strokeWidth={1} />
              {labelled.map((i) => (
                <G key={points[i]!.date}>
                  <Line x1={x(i)} x2={x(i)} y1={PAD.top + plotH} y2={PAD.top + plotH + 4} stroke={colors.inkMuted} strokeWidth={1} />
                  <SvgText
                    x={x(i)}
                    y={PAD.top + plotH + 18}
                    fontSize={11}
                    fontFamily={fonts.regular}
                    fill={colors.inkMuted}
                    textAnchor={i === 0 && points.length > 1 ? 'start' : i === points.length - 1 && points.length > 1 ? 'end' : 'middle'}
                  >
                    {shortDay(points[i]!.date)}
                  </SvgText>
                </G>
              ))}
              <Path d={area} fill={colors.spruceSoft} opacity={0.8} />
              <Path d={line('open')} stroke={colors.spruce} strokeWidth={2.5} fill="none" strokeLinejoin="round" />
              <Path d={line('fixSubmitted')} stroke={FIX_COLOUR} strokeWidth={2} strokeDasharray="6 4" fill="none" strokeLinejoin="round" />
            </Svg>
          ) : null}
        </View>
      )}
      <AppText variant="small" muted testID={`${testID}-summary`}>
        {summary}
      </AppText>
    </View>
  );
}

const styles = StyleSheet.create({
  wrap: { gap: space.sm },
  legend: { flexDirection: 'row', gap: space.lg, flexWrap: 'wrap' },
  key: { flexDirection: 'row', alignItems: 'center', gap: space.xs },
  swatch: { width: 18, height: 4, borderRadius: 2 },
  swatchDash: { width: 18, height: 0, borderTopWidth: 3, borderStyle: 'dashed' },
  plot: { width: '100%', height: HEIGHT },
});
