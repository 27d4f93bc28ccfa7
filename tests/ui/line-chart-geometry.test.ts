import { describe, expect, it } from 'vitest';
import { plotBox } from '../../src/components/charts/axes';
import { lineChartGeometry } from '../../src/components/charts/line-chart-geometry';

const W = 400;
const H = 240;
const base = { width: W, height: H };

// Pixel positions in the tests are worked out by hand from the frame's box (the margins every chart shares) and the data range.
const box = plotBox(W, H);
describe('lineChartGeometry', () => {
  it('maps the data range onto the plot area, larger y higher up', () => {
    const g = lineChartGeometry({
      ...base,
      series: [
        {
          id: 'a',
          points: [
            { x: 0, y: 0 },
            { x: 10, y: 100 },
          ],
        },
      ],
    });
    expect(g.box).toEqual(box);
    expect(g.lines[0]!.d).toBe(`M${box.left},${box.bottom}L${box.right},${box.top}`);
  });

  it('breaks a line at a missing value instead of joining across it', () => {
    const g = lineChartGeometry({
      ...base,
      series: [
        {
          id: 'a',
          points: [
            { x: 0, y: 1 },
            { x: 1, y: 2 },
            { x: 2, y: NaN },
            { x: 3, y: 2 },
            { x: 4, y: 1 },
          ],
        },
      ],
    });
    expect(g.lines[0]!.d.match(/M/g)!.length).toBe(2);
  });

  it('starts at zero when asked, and ticks cover the data with labels from the formatter', () => {
    const g = lineChartGeometry({
      ...base,
      yFromZero: true,
      formatY: (v) => `${v} g/L`,
      series: [
        {
          id: 'a',
          points: [
            { x: 40, y: 180 },
            { x: 80, y: 240 },
          ],
        },
      ],
    });
    expect(g.yTicks[0]!.value).toBe(0);
    expect(g.yTicks[0]!.label).toBe('0 g/L');
    expect(g.yTicks.at(-1)!.value).toBeGreaterThanOrEqual(240);
    expect(g.xTicks.map((t) => t.value)).toEqual([40, 50, 60, 70, 80]);
    expect(g.yTicks[0]!.pos).toBe(box.bottom);
  });

  it('closes a band between its lower and upper edges and includes it in the range', () => {
    const g = lineChartGeometry({
      ...base,
      series: [
        {
          id: 'a',
          points: [
            { x: 0, y: 5 },
            { x: 1, y: 5 },
          ],
        },
      ],
      bands: [
        {
          id: 'b',
          points: [
            { x: 0, lo: 4, hi: 8 },
            { x: 1, lo: 3, hi: 9 },
          ],
        },
      ],
    });
    expect(g.bands[0]!.d.endsWith('Z')).toBe(true);
    expect(g.yTicks[0]!.value).toBeLessThanOrEqual(3);
    expect(g.yTicks.at(-1)!.value).toBeGreaterThanOrEqual(9);
  });

  it('places markers on the data', () => {
    const g = lineChartGeometry({
      ...base,
      series: [
        {
          id: 'a',
          points: [
            { x: 0, y: 0 },
            { x: 10, y: 10 },
          ],
        },
      ],
      markers: [{ id: 'm', x: 1, y: 1, label: 'L' }],
    });
    expect(g.markers[0]!.cx).toBeCloseTo(box.left + (box.right - box.left) / 10, 9);
    expect(g.markers[0]!.cy).toBeCloseTo(box.top + (box.bottom - box.top) * 0.9, 9);
  });

  it('copes with a single flat point without dividing by zero', () => {
    const g = lineChartGeometry({ ...base, series: [{ id: 'a', points: [{ x: 5, y: 5 }] }] });
    expect(g.lines[0]!.d).not.toMatch(/NaN/);
  });
});
