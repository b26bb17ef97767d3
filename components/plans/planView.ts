/**
 * The plan viewer's geometry, pure (tested in tests/components/planView.test.ts). The plan is
 * drawn at `base` size (the viewport's width, the plan's aspect) times `scale`, its top-left
 * corner at (x, y) in the viewport. Pins are fractions of the plan's width and height.
 */
export interface Size {
  w: number;
  h: number;
}
export interface ViewState {
  scale: number;
  x: number;
  y: number;
}

export const MAX_SCALE = 8;
/** A press that moves less than this (px) is a tap, not a drag. */
export const TAP_SLOP = 8;

/** The plan drawn across the viewport's width. */
export function baseSize(viewportWidth: number, plan: Size): Size {
  return { w: viewportWidth, h: (viewportWidth * plan.h) / plan.w };
}

/** The smallest scale: the whole plan inside the viewport. */
export function fitScale(viewport: Size, base: Size): number {
  if (base.w <= 0 || base.h <= 0) return 1;
  return Math.min(1, viewport.w / base.w, viewport.h / base.h);
}

/** Keeps the plan in view: centred along an axis where it is smaller than the viewport, else no gap at the edges. */
export function clampView(v: ViewState, viewport: Size, base: Size): ViewState {
  const scale = Math.min(MAX_SCALE, Math.max(fitScale(viewport, base), v.scale));
  const w = base.w * scale;
  const h = base.h * scale;
  const x = w <= viewport.w ? (viewport.w - w) / 2 : Math.min(0, Math.max(viewport.w - w, v.x));
  const y = h <= viewport.h ? (viewport.h - h) / 2 : Math.min(0, Math.max(viewport.h - h, v.y));
  return { scale, x, y };
}

export function fitView(viewport: Size, base: Size): ViewState {
  return clampView({ scale: fitScale(viewport, base), x: 0, y: 0 }, viewport, base);
}

/** Zooms by `factor` keeping the point (px, py) of the viewport over the same spot of the plan. */
export function zoomAt(v: ViewState, factor: number, px: number, py: number, viewport: Size, base: Size): ViewState {
  const target = Math.min(MAX_SCALE, Math.max(fitScale(viewport, base), v.scale * factor));
  const k = target / v.scale;
  return clampView({ scale: target, x: px - (px - v.x) * k, y: py - (py - v.y) * k }, viewport, base);
}

export function panBy(v: ViewState, dx: number, dy: number, viewport: Size, base: Size): ViewState {
  return clampView({ ...v, x: v.x + dx, y: v.y + dy }, viewport, base);
}

/** The plan point under a viewport point, as fractions (0..1), or null when it is off the plan. */
export function toFraction(v: ViewState, base: Size, px: number, py: number): { x: number; y: number } | null {
  const x = (px - v.x) / (base.w * v.scale);
  const y = (py - v.y) / (base.h * v.scale);
  if (!(x >= 0 && x <= 1 && y >= 0 && y <= 1)) return null;
  // Four decimals: a tenth of a pixel on a 4096 px plan is plenty.
  return { x: Math.round(x * 10_000) / 10_000, y: Math.round(y * 10_000) / 10_000 };
}

/** Where a plan point (fractions) is in the viewport. */
export function toViewport(v: ViewState, base: Size, fx: number, fy: number): { left: number; top: number } {
  return { left: v.x + fx * base.w * v.scale, top: v.y + fy * base.h * v.scale };
}

/**
 * The viewport's height: on a wide screen the whole plan at the full width (up to 1.5 windows);
 * on a phone at least half the window (room to zoom into a landscape sheet) and at most 70%.
 */
export function viewportHeight(base: Size, windowHeight: number, wide: boolean): number {
  if (wide) return Math.round(Math.min(base.h, windowHeight * 1.5));
  const cap = Math.max(280, windowHeight * 0.7);
  return Math.round(Math.min(Math.max(base.h, windowHeight * 0.5), cap));
}
