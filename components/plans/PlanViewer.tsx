/**
 * The plan viewer in the native app: drag with one finger, pinch with two, +/−/Fit buttons
 * (PanResponder, no extra package). A touch that does not move is a tap: while placing, it
 * places the pin there. Same props as PlanViewer.web.tsx.
 */
import { useMemo, useRef } from 'react';
import { PanResponder, type GestureResponderEvent, type View } from 'react-native';
import { PlanCanvas } from './PlanCanvas';
import { TAP_SLOP, toFraction } from './planView';
import type { PlanViewerProps } from './PlanViewer.types';
import { usePlanViewState } from './usePlanViewState';

export function PlanViewer(props: PlanViewerProps) {
  const { planWidth, planHeight, wide, windowHeight } = props;
  const state = usePlanViewState({ w: planWidth, h: planHeight }, wide, windowHeight);
  const node = useRef<View | null>(null);
  const origin = useRef({ x: 0, y: 0 });
  const placeRef = useRef(props);
  placeRef.current = props;
  const { zoom, pan, latest } = state;

  const responder = useMemo(() => {
    let last = { x: 0, y: 0 };
    let pinch: { dist: number; mx: number; my: number } | null = null;
    const touchesOf = (e: GestureResponderEvent) =>
      e.nativeEvent.touches.map((t) => ({ x: t.pageX - origin.current.x, y: t.pageY - origin.current.y }));
    const two = (t: { x: number; y: number }[]) => ({
      dist: Math.hypot(t[0]!.x - t[1]!.x, t[0]!.y - t[1]!.y),
      mx: (t[0]!.x + t[1]!.x) / 2,
      my: (t[0]!.y + t[1]!.y) / 2,
    });
    return PanResponder.create({
      onStartShouldSetPanResponder: () => true,
      onMoveShouldSetPanResponder: () => true,
      onPanResponderGrant: (e) => {
        node.current?.measureInWindow((x, y) => {
          origin.current = { x, y };
        });
        last = { x: e.nativeEvent.pageX, y: e.nativeEvent.pageY };
        pinch = null;
      },
      onPanResponderMove: (e) => {
        const t = touchesOf(e);
        if (t.length >= 2) {
          const now = two(t);
          if (pinch && pinch.dist > 0) {
            zoom(now.dist / pinch.dist, now.mx, now.my);
            pan(now.mx - pinch.mx, now.my - pinch.my);
          }
          pinch = now;
          return;
        }
        pinch = null;
        pan(e.nativeEvent.pageX - last.x, e.nativeEvent.pageY - last.y);
        last = { x: e.nativeEvent.pageX, y: e.nativeEvent.pageY };
      },
      onPanResponderRelease: (e, g) => {
        if (!placeRef.current.placing || Math.hypot(g.dx, g.dy) > TAP_SLOP || g.numberActiveTouches > 1) return;
        const { view, base } = latest.current;
        const at = toFraction(view, base, e.nativeEvent.pageX - origin.current.x, e.nativeEvent.pageY - origin.current.y);
        if (at) placeRef.current.onPlace(at);
      },
    });
  }, [zoom, pan, latest]);

  return (
    <PlanCanvas
      ref={node}
      {...props}
      view={state.view}
      base={state.base}
      viewport={state.viewport}
      onZoom={(f) => zoom(f)}
      onFit={state.fit}
      onLayoutWidth={state.onLayoutWidth}
      gestureProps={responder.panHandlers}
    />
  );
}
