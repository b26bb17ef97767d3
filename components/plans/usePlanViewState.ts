import { useCallback, useEffect, useMemo, useRef, useState } from 'react';
import { baseSize, clampView, fitView, panBy, viewportHeight, zoomAt, type Size, type ViewState } from './planView';

/** The zoom and pan of one plan viewer; `latest` is for gesture handlers that outlive a render. */
export function usePlanViewState(plan: Size, wide: boolean, windowHeight: number) {
  const [width, setWidth] = useState(0);
  const base = useMemo(() => baseSize(width, plan), [width, plan.w, plan.h]); // eslint-disable-line react-hooks/exhaustive-deps
  const viewport = useMemo<Size>(() => ({ w: width, h: width > 0 ? viewportHeight(base, windowHeight, wide) : 0 }), [width, base, windowHeight, wide]);
  const [view, setView] = useState<ViewState>({ scale: 1, x: 0, y: 0 });
  const latest = useRef({ view, base, viewport });
  latest.current = { view, base, viewport };

  // A new size (rotation, resize, another plan): start from the whole plan again.
  useEffect(() => {
    if (viewport.w > 0) setView(fitView(viewport, base));
  }, [viewport.w, viewport.h, base.w, base.h]); // eslint-disable-line react-hooks/exhaustive-deps

  const zoom = useCallback((factor: number, px?: number, py?: number) => {
    const { base: b, viewport: vp } = latest.current;
    setView((v) => zoomAt(v, factor, px ?? vp.w / 2, py ?? vp.h / 2, vp, b));
  }, []);
  const pan = useCallback((dx: number, dy: number) => {
    const { base: b, viewport: vp } = latest.current;
    setView((v) => panBy(v, dx, dy, vp, b));
  }, []);
  const fit = useCallback(() => {
    const { base: b, viewport: vp } = latest.current;
    setView(fitView(vp, b));
  }, []);
  const clamp = useCallback(() => {
    const { base: b, viewport: vp } = latest.current;
    setView((v) => clampView(v, vp, b));
  }, []);
  const onLayoutWidth = useCallback((w: number) => setWidth((old) => (Math.abs(old - w) >= 1 ? Math.round(w) : old)), []);

  return { view, base, viewport, zoom, pan, fit, clamp, onLayoutWidth, latest };
}
