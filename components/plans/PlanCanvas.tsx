/**
 * What both plan viewers draw (PlanViewer.tsx for the native app, PlanViewer.web.tsx for
 * browsers): the plan image at the current zoom, its pins, and the zoom buttons. The viewers
 * add the gestures (pinch and drag, wheel on the web).
 */
import { forwardRef, type ReactNode } from 'react';
import { Image, Pressable, StyleSheet, View } from 'react-native';
import { colors, fonts, radius, space } from '../theme';
import { AppText } from '../ui/AppText';
import { FindingPinMark, UnitPinMark } from './PinMark';
import { findingPinLabel } from './pinStyle';
import { toViewport, type Size, type ViewState } from './planView';
import type { PlanViewerProps } from './PlanViewer.types';
import { usePointerWords } from '../ui/usePointerWords';

const FINDING_PIN = 34;
const UNIT_PIN = 22;

export interface PlanCanvasProps extends Omit<PlanViewerProps, 'onPlace' | 'wide' | 'windowHeight' | 'planWidth' | 'planHeight'> {
  view: ViewState;
  base: Size;
  viewport: Size;
  onZoom: (factor: number) => void;
  onFit: () => void;
  onLayoutWidth: (width: number) => void;
  /** Gesture handlers (native) spread on the viewport. */
  gestureProps?: object;
  children?: ReactNode;
}

export const PlanCanvas = forwardRef<View, PlanCanvasProps>(function PlanCanvas(
  { imageUri, findings, units, placing, onOpenFinding, onOpenUnit, selectedId, view, base, viewport, onZoom, onFit, onLayoutWidth, gestureProps },
  ref,
) {
  const w = base.w * view.scale;
  const h = base.h * view.scale;
  const showTags = view.scale >= 2;
  const { press } = usePointerWords();
  return (
    <View style={styles.frame}>
      <View style={[styles.border, placing && styles.placing]}>
        <View
          ref={ref}
          onLayout={(e) => onLayoutWidth(e.nativeEvent.layout.width)}
          style={[styles.viewport, { height: viewport.h }]}
          testID="plan-viewport"
          accessibilityLabel={placing ? `Plan: ${press} where the item is` : 'Plan'}
          {...gestureProps}
        >
          {viewport.w > 0 ? (
            <Image
              source={{ uri: imageUri }}
              style={{ position: 'absolute', left: view.x, top: view.y, width: w, height: h }}
              resizeMode="stretch"
              testID="plan-image"
              accessibilityIgnoresInvertColors
            />
          ) : null}
          {viewport.w > 0
            ? units.map((u) => {
                const p = toViewport(view, base, u.x, u.y);
                return (
                  <Pressable
                    key={`u-${u.id}`}
                    onPress={() => onOpenUnit(u.id)}
                    pointerEvents={placing ? 'none' : 'auto'}
                    accessibilityRole="link"
                    accessibilityLabel={`Unit ${u.tag}`}
                    testID={`plan-unit-pin-${u.tag}`}
                    style={[styles.pin, { left: p.left - UNIT_PIN / 2, top: p.top - UNIT_PIN / 2 }]}
                  >
                    <UnitPinMark size={UNIT_PIN} />
                    {showTags || u.id === selectedId ? (
                      <AppText style={styles.tag} numberOfLines={1}>
                        {u.tag}
                      </AppText>
                    ) : null}
                  </Pressable>
                );
              })
            : null}
          {viewport.w > 0
            ? findings.map((f) => {
                const p = toViewport(view, base, f.x, f.y);
                return (
                  <Pressable
                    key={`f-${f.id}`}
                    onPress={() => onOpenFinding(f.id)}
                    pointerEvents={placing ? 'none' : 'auto'}
                    accessibilityRole="link"
                    accessibilityLabel={findingPinLabel(f)}
                    testID={`plan-finding-pin-${f.number}`}
                    style={[styles.pin, { left: p.left - FINDING_PIN / 2, top: p.top - FINDING_PIN / 2 }]}
                  >
                    <FindingPinMark status={f.status} severity={f.severity} overdue={f.overdue} text={String(f.number)} size={FINDING_PIN} selected={f.id === selectedId} />
                  </Pressable>
                );
              })
            : null}
        </View>
      </View>
      <View style={styles.controls}>
        <ZoomButton label="+" name="Zoom in" onPress={() => onZoom(1.5)} testID="plan-zoom-in" />
        <ZoomButton label="−" name="Zoom out" onPress={() => onZoom(1 / 1.5)} testID="plan-zoom-out" />
        <ZoomButton label="Fit" name="Fit the plan" onPress={onFit} testID="plan-zoom-fit" />
      </View>
      <AppText variant="small" muted style={styles.zoomText} testID="plan-zoom-level">
        {`${Math.round(view.scale * 100)}%`}
      </AppText>
    </View>
  );
});

function ZoomButton({ label, name, onPress, testID }: { label: string; name: string; onPress: () => void; testID: string }) {
  return (
    <Pressable onPress={onPress} accessibilityRole="button" accessibilityLabel={name} testID={testID} style={({ pressed }) => [styles.zoom, pressed && styles.zoomPressed]}>
      <AppText style={styles.zoomLabel}>{label}</AppText>
    </Pressable>
  );
}

const styles = StyleSheet.create({
  frame: { width: '100%', position: 'relative' },
  // The border is on a wrapper: the viewport itself has none, so its layout box is exactly where
  // the plan is drawn and where taps are measured from.
  border: { width: '100%', borderWidth: 2, borderColor: colors.line, borderRadius: radius.sm, overflow: 'hidden' },
  viewport: { width: '100%', overflow: 'hidden', backgroundColor: colors.surface, position: 'relative' },
  placing: { borderColor: colors.focus },
  pin: { position: 'absolute', alignItems: 'center' },
  tag: {
    fontFamily: fonts.bold,
    fontSize: 11,
    lineHeight: 14,
    color: colors.spruce,
    backgroundColor: 'rgba(255,255,255,0.85)',
    paddingHorizontal: 2,
    marginTop: 1,
  },
  controls: { position: 'absolute', right: space.sm, top: space.sm, gap: space.xs },
  zoom: {
    minWidth: 44,
    height: 44,
    paddingHorizontal: space.sm,
    borderRadius: radius.sm,
    backgroundColor: colors.surface,
    borderWidth: 1,
    borderColor: colors.spruce,
    alignItems: 'center',
    justifyContent: 'center',
  },
  zoomPressed: { backgroundColor: colors.spruceSoft },
  zoomLabel: { fontFamily: fonts.bold, fontSize: 18, color: colors.spruce },
  zoomText: { position: 'absolute', left: space.sm, bottom: space.sm, backgroundColor: 'rgba(255,255,255,0.8)', paddingHorizontal: 4 },
});
