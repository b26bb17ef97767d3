/**
 * The plan viewer in a browser: drag to pan (mouse or one finger), pinch with two fingers,
 * the mouse wheel or trackpad zooms at the pointer, +/−/Fit buttons. Pointer events on the
 * viewport's DOM node (touch-action: none, so the page does not scroll or zoom under a finger).
 * A press that does not move is a tap: while placing, it places the pin there.
 */
import { useEffect, useRef } from 'react';
import type { View } from 'react-native';
import { PlanCanvas } from './PlanCanvas';
import { TAP_SLOP, toFraction } from './planView';
import type { PlanViewerProps } from './PlanViewer.types';
import { usePlanViewState } from './usePlanViewState';

export function PlanViewer(props: PlanViewerProps) {
  const { planWidth, planHeight, wide, windowHeight, onPlace } = props;
  const state = usePlanViewState({ w: planWidth, h: planHeight }, wide, windowHeight);
  const node = useRef<View | null>(null);
  const placeRef = useRef({ placing: props.placing, onPlace });
  placeRef.current = { placing: props.placing, onPlace };
  const { zoom, pan, latest } = state;

  useEffect(() => {
    const el = node.current as unknown as HTMLElement | null;
    if (!el || typeof el.addEventListener !== 'function') return;
    el.style.touchAction = 'none';
    el.style.cursor = 'grab';
    const pointers = new Map<number, { x: number; y: number }>();
    let tap: { id: number; x: number; y: number; moved: boolean } | null = null;
    let pinch: { dist: number; mx: number; my: number } | null = null;

    const local = (e: { clientX: number; clientY: number }) => {
      const r = el.getBoundingClientRect();
      return { x: e.clientX - r.left, y: e.clientY - r.top };
    };
    const twoFingers = () => {
      const [a, b] = [...pointers.values()];
      return { dist: Math.hypot(a!.x - b!.x, a!.y - b!.y), mx: (a!.x + b!.x) / 2, my: (a!.y + b!.y) / 2 };
    };

    const down = (e: PointerEvent) => {
      if (e.pointerType === 'mouse' && e.button !== 0) return;
      pointers.set(e.pointerId, local(e));
      if (pointers.size === 1) tap = { id: e.pointerId, ...local(e), moved: false };
      else {
        tap = null;
        pinch = pointers.size === 2 ? twoFingers() : null;
      }
      window.addEventListener('pointermove', move);
      window.addEventListener('pointerup', up);
      window.addEventListener('pointercancel', up);
    };
    const move = (e: PointerEvent) => {
      const prev = pointers.get(e.pointerId);
      if (!prev) return;
      const p = local(e);
      pointers.set(e.pointerId, p);
      if (pointers.size >= 2 && pinch) {
        const now = twoFingers();
        if (pinch.dist > 0) zoom(now.dist / pinch.dist, now.mx, now.my);
        pan(now.mx - pinch.mx, now.my - pinch.my);
        pinch = now;
        return;
      }
      if (tap && !tap.moved && Math.hypot(p.x - tap.x, p.y - tap.y) > TAP_SLOP) tap.moved = true;
      if (!tap || tap.moved) {
        el.style.cursor = 'grabbing';
        pan(p.x - prev.x, p.y - prev.y);
      }
    };
    const up = (e: PointerEvent) => {
      if (!pointers.has(e.pointerId)) return;
      const p = local(e);
      pointers.delete(e.pointerId);
      if (pointers.size < 2) pinch = null;
      if (pointers.size === 0) {
        window.removeEventListener('pointermove', move);
        window.removeEventListener('pointerup', up);
        window.removeEventListener('pointercancel', up);
        el.style.cursor = 'grab';
      }
      if (e.type === 'pointerup' && tap && tap.id === e.pointerId && !tap.moved && placeRef.current.placing) {
        const { view, base } = latest.current;
        const at = toFraction(view, base, p.x, p.y);
        if (at) placeRef.current.onPlace(at);
      }
      if (tap?.id === e.pointerId) tap = null;
    };
    const wheel = (e: WheelEvent) => {
      e.preventDefault();
      const p = local(e);
      // Trackpad pinches arrive as wheel events with ctrlKey; both zoom smoothly.
      const factor = Math.exp(-e.deltaY * (e.ctrlKey ? 0.01 : 0.0015));
      zoom(factor, p.x, p.y);
    };
    const noDrag = (e: Event) => e.preventDefault();

    el.addEventListener('pointerdown', down);
    el.addEventListener('wheel', wheel, { passive: false });
    el.addEventListener('dragstart', noDrag);
    return () => {
      el.removeEventListener('pointerdown', down);
      el.removeEventListener('wheel', wheel);
      el.removeEventListener('dragstart', noDrag);
      window.removeEventListener('pointermove', move);
      window.removeEventListener('pointerup', up);
      window.removeEventListener('pointercancel', up);
    };
  }, [zoom, pan, latest, state.viewport.w > 0]); // eslint-disable-line react-hooks/exhaustive-deps

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
    />
  );
}
