/**
 * The plan viewer's geometry (components/plans/planView.ts) and the legend. The numbers are
 * worked by hand beside each check: a 1600 × 1000 plan in a 400 px wide viewport is drawn
 * 400 × 250 at scale 1.
 */
import { render, screen } from '@testing-library/react-native';
import { PlanLegend } from '../../components/plans/PlanLegend';
import { findingPinLabel, SEVERITY_SHAPE, STATUS_PIN } from '../../components/plans/pinStyle';
import { baseSize, clampView, fitScale, fitView, MAX_SCALE, panBy, toFraction, toViewport, viewportHeight, zoomAt } from '../../components/plans/planView';

const plan = { w: 1600, h: 1000 };
const base = baseSize(400, plan); // 400 × 250
const viewport = { w: 400, h: 250 };

describe('plan geometry', () => {
  it('draws the plan across the viewport width at its own aspect', () => {
    expect(base).toEqual({ w: 400, h: 250 });
    expect(fitScale(viewport, base)).toBe(1);
    expect(fitView(viewport, base)).toEqual({ scale: 1, x: 0, y: 0 });
    // A portrait plan (1000 × 2000) in a 400 × 300 viewport: 400 × 800 at scale 1; fits at 300 / 800 = 0.375, centred: x = (400 − 150) / 2 = 125.
    const tall = baseSize(400, { w: 1000, h: 2000 });
    expect(fitView({ w: 400, h: 300 }, tall)).toEqual({ scale: 0.375, x: 125, y: 0 });
  });

  it('zooms about a point, keeping that point over the same spot of the plan', () => {
    // Zoom ×2 at (100, 50): that point was plan fraction (0.25, 0.2) and stays so.
    const v = zoomAt({ scale: 1, x: 0, y: 0 }, 2, 100, 50, viewport, base);
    expect(v).toEqual({ scale: 2, x: -100, y: -50 });
    expect(toFraction(v, base, 100, 50)).toEqual({ x: 0.25, y: 0.2 });
    // Never below the fit, never above MAX_SCALE.
    expect(zoomAt(v, 0.01, 0, 0, viewport, base).scale).toBe(1);
    expect(zoomAt(v, 100, 0, 0, viewport, base).scale).toBe(MAX_SCALE);
  });

  it('keeps the plan in view when panning', () => {
    const v = { scale: 2, x: -100, y: -50 }; // drawn 800 × 500
    expect(panBy(v, 500, 500, viewport, base)).toEqual({ scale: 2, x: 0, y: 0 });
    expect(panBy(v, -1000, -1000, viewport, base)).toEqual({ scale: 2, x: -400, y: -250 });
    expect(clampView({ scale: 0.5, x: 7, y: 7 }, viewport, base)).toEqual({ scale: 1, x: 0, y: 0 });
  });

  it('turns a tap into plan fractions and back, and refuses a tap off the plan', () => {
    const v = { scale: 2, x: -100, y: -50 };
    expect(toFraction(v, base, 300, 200)).toEqual({ x: 0.5, y: 0.5 }); // (300 + 100) / 800, (200 + 50) / 500
    expect(toViewport(v, base, 0.5, 0.5)).toEqual({ left: 300, top: 200 });
    const tall = fitView({ w: 400, h: 300 }, baseSize(400, { w: 1000, h: 2000 }));
    expect(toFraction(tall, baseSize(400, { w: 1000, h: 2000 }), 50, 100)).toBeNull(); // left of the centred plan
  });

  it('sizes the viewer: the whole plan on a wide screen, half to 70% of a phone window', () => {
    expect(viewportHeight({ w: 1160, h: 725 }, 800, true)).toBe(725);
    expect(viewportHeight({ w: 358, h: 716 }, 844, false)).toBe(591); // 0.7 × 844 = 590.8
    expect(viewportHeight({ w: 358, h: 224 }, 844, false)).toBe(422); // a landscape sheet: half of 844
  });
});

describe('pin scheme and legend', () => {
  it('gives every status its own fill and every severity its own shape', () => {
    expect(new Set(Object.values(STATUS_PIN).map((s) => s.fill)).size).toBe(3);
    expect(new Set(Object.values(SEVERITY_SHAPE)).size).toBe(3);
    expect(findingPinLabel({ label: '#12', code: 'DR-03', status: 'fix_submitted', severity: 'major', overdue: true })).toBe(
      'Finding #12, DR-03, fix submitted, major, overdue',
    );
    // A defect the catalogue lacks is named in words, not by its internal code.
    expect(findingPinLabel({ label: '#13', code: 'OTHER', status: 'open', severity: 'minor', overdue: false })).toBe('Finding #13, Something else, open, minor');
  });

  it('explains fills, shapes, the overdue halo and unit pins', () => {
    render(<PlanLegend />);
    for (const words of ['Fill: status', 'Open', 'Fix submitted', 'Closed', 'Shape: severity', 'Critical', 'Major', 'Minor', 'Ochre halo: overdue', 'Unit']) {
      expect(screen.getByText(words)).toBeTruthy();
    }
  });
});
