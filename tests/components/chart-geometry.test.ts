import { describe, expect, it } from 'vitest';
import { arrheniusGeometry, invT1000 } from '../../src/components/charts/arrhenius-geometry';
import { decayGeometry } from '../../src/components/charts/decay-geometry';
import { lotHistoryGeometry } from '../../src/components/charts/lot-history-geometry';

const W = 400;
const H = 260;

describe('decay geometry', () => {
  const points = [
    { tempC: 60, timeH: 0, residual: 1 },
    { tempC: 60, timeH: 10, residual: 0.5 },
    { tempC: 70, timeH: 0, residual: 1 },
    { tempC: 70, timeH: 5, residual: 0.25 },
  ];
  const fit = { tRefC: 60, kdRefPerH: Math.LN2 / 10, edKJPerMol: 200 };

  it('puts time 0 at the left, residual 1 above residual 0.5 (y inverted), one series per temperature', () => {
    const g = decayGeometry(points, fit, W, H);
    expect(g.series.map((s) => s.tempC)).toEqual([60, 70]);
    const [a, b] = g.series[0]!.dots;
    expect(a!.x).toBe(g.box.left);
    expect(a!.y).toBeLessThan(b!.y);
    expect(b!.x).toBeGreaterThan(a!.x);
    expect(g.xTicks[0]!.value).toBe(0);
    expect(g.yTicks.at(-1)!.pos).toBeLessThan(g.yTicks[0]!.pos);
  });

  it('draws the fitted curve through exp(-kd t): at the reference temperature it passes the half-life point', () => {
    const g = decayGeometry(points, fit, W, H);
    const s60 = g.series[0]!;
    expect(s60.kdPerH).toBeCloseTo(Math.LN2 / 10, 12);
    // 70 °C is hotter: faster decay under a positive Ed.
    expect(g.series[1]!.kdPerH!).toBeGreaterThan(s60.kdPerH!);
    const halfDot = s60.dots[1]!;
    const coords = s60
      .curve!.slice(1)
      .split('L')
      .map((xy) => xy.split(',').map(Number) as [number, number]);
    const nearest = coords.reduce((best, c) => (Math.abs(c[0] - halfDot.x) < Math.abs(best[0] - halfDot.x) ? c : best));
    expect(Math.abs(nearest[1] - halfDot.y)).toBeLessThan(3);
  });

  it('has dots but no curve without a fit', () => {
    const g = decayGeometry(points, null, W, H);
    expect(g.series.every((s) => s.curve === null && s.dots.length === 2)).toBe(true);
  });
});

describe('Arrhenius geometry', () => {
  it('places hotter temperatures left (smaller 1000/T) and higher kd up; the fit line spans the data', () => {
    const g = arrheniusGeometry(
      {
        perTemperature: [
          { c: 60, kdPerH: 0.05 },
          { c: 70, kdPerH: 0.4 },
          { c: 65, kdPerH: 0 },
        ],
        fit: { tRefC: 60, kdRefPerH: 0.05, edKJPerMol: 200 },
      },
      W,
      H,
    );
    // kd = 0 cannot sit on a log axis.
    expect(g.dots.map((d) => d.c)).toEqual([60, 70]);
    const [d60, d70] = g.dots;
    expect(d70!.x).toBeLessThan(d60!.x);
    expect(d70!.y).toBeLessThan(d60!.y);
    expect(g.fitLine!.x1).toBeCloseTo(d70!.x, 6);
    expect(g.fitLine!.x2).toBeCloseTo(d60!.x, 6);
    expect(g.fitLine!.y2).toBeCloseTo(d60!.y, 6);
    // 1000/T at 60 °C = 1000/333.15 K [C].
    expect(invT1000(60)).toBeCloseTo(3.00165, 5);
  });
});

describe('lot history geometry', () => {
  const pts = [
    { lotCode: 'A', receivedOn: '2026-05-14', basis: 'assay' as const, halfLifeH: 26, lowerH: 24, upperH: 28 },
    { lotCode: 'B', receivedOn: '2026-08-21', basis: 'certificate' as const, halfLifeH: 24, lowerH: null, upperH: null },
    { lotCode: 'C', receivedOn: '2026-11-18', basis: 'none' as const, halfLifeH: null, lowerH: null, upperH: null },
  ];

  it('orders lots by date left to right, draws intervals only where an assay gave one, and leaves out lots with no figure', () => {
    const g = lotHistoryGeometry(pts, 20, W, H);
    expect(g.marks.map((m) => m.p.lotCode)).toEqual(['A', 'B']);
    expect(g.marks[0]!.x).toBeLessThan(g.marks[1]!.x);
    expect(g.marks[0]!.yLow!).toBeGreaterThan(g.marks[0]!.y);
    expect(g.marks[0]!.yHigh!).toBeLessThan(g.marks[0]!.y);
    expect(g.marks[1]!.yLow).toBeNull();
    // The 20 h specification lies below both lots' half-lives, so lower on screen (larger y).
    expect(g.specY).toBeGreaterThan(g.marks[1]!.y);
    expect(g.xTicks.length).toBeGreaterThan(1);
  });
});
