import { describe, expect, it } from 'vitest';
import { batchTemperatureGeometry, type BatchTemperatureInput } from '../../src/components/charts/batch-temperature-geometry';
import { forecastAccuracyGeometry } from '../../src/components/charts/forecast-accuracy-geometry';

const base: BatchTemperatureInput = {
  plan: [
    { h: 0, c: 20 },
    { h: 1, c: 50 },
  ],
  batchH: 10,
  toleranceC: 1.5,
  readings: [],
  gapLimitH: 0.5,
  vesselMaxC: 55,
  nowH: 2,
};

describe('batchTemperatureGeometry', () => {
  it('puts time left to right and temperature bottom to top inside the plotting box', () => {
    const g = batchTemperatureGeometry(
      {
        ...base,
        readings: [
          { h: 0, c: 20 },
          { h: 10, c: 50 },
        ],
      },
      400,
      260,
    );
    expect(g.dots[0].x).toBeCloseTo(g.box.left, 9);
    expect(g.dots[1].x).toBeCloseTo(g.box.right, 9);
    // Hotter is higher on screen: a smaller SVG y.
    expect(g.dots[1].y).toBeLessThan(g.dots[0].y);
    for (const d of g.dots) {
      expect(d.y).toBeGreaterThanOrEqual(g.box.top);
      expect(d.y).toBeLessThanOrEqual(g.box.bottom);
    }
  });

  it('draws control-system readings apart from phone readings, and the link gaps as spans', () => {
    const readings = [
      { h: 1, c: 50 },
      { h: 1.1, c: 50.1, isControl: true },
      { h: 1.2, c: 50.2, isControl: true },
      { h: 1.25, c: 50 },
    ];
    const g = batchTemperatureGeometry({ ...base, readings, gaps: [{ fromH: 2, toH: 3 }] }, 400, 260);
    expect(g.loggedPaths).toHaveLength(1);
    expect(g.controlPaths).toHaveLength(1);
    expect(g.dots.map((d) => d.isControl)).toEqual([false, true, true, false]);
    // 2 h to 3 h of a 10 h axis: a tenth of the box, starting a fifth in.
    const w = g.box.right - g.box.left;
    expect(g.gapSpans[0]!.x0).toBeCloseTo(g.box.left + 0.2 * w, 9);
    expect(g.gapSpans[0]!.x1 - g.gapSpans[0]!.x0).toBeCloseTo(0.1 * w, 9);
  });

  it('breaks the logged line at a gap longer than the limit', () => {
    const readings = [
      { h: 1, c: 50 },
      { h: 1.25, c: 50 },
      { h: 3, c: 50 },
      { h: 3.25, c: 50 },
      { h: 3.5, c: 50 },
    ];
    const g = batchTemperatureGeometry({ ...base, readings }, 400, 260);
    expect(g.loggedPaths).toHaveLength(2);
    expect(g.loggedPaths[0].match(/L/g)).toHaveLength(1);
    expect(g.loggedPaths[1].match(/L/g)).toHaveLength(2);
  });

  it('marks readings outside the band against the plan at their own time (the ramp included)', () => {
    const g = batchTemperatureGeometry(
      {
        ...base,
        readings: [
          { h: 0.5, c: 35 },
          { h: 0.5, c: 38 },
          { h: 5, c: 48.4 },
        ],
      },
      400,
      260,
    );
    expect(g.dots.map((d) => d.isOutside)).toEqual([false, true, true]);
  });

  it('shows the vessel maximum only when it is near the data', () => {
    expect(batchTemperatureGeometry(base, 400, 260).vesselMaxY).not.toBeNull();
    expect(batchTemperatureGeometry({ ...base, vesselMaxC: 200 }, 400, 260).vesselMaxY).toBeNull();
  });

  it('drops the dots but keeps the line for a long historian record', () => {
    const readings = Array.from({ length: 50_000 }, (_, i) => ({ h: i / 5000, c: 50 + Math.sin(i) }));
    const g = batchTemperatureGeometry({ ...base, readings }, 400, 260);
    expect(g.dots).toEqual([]);
    expect(g.loggedPaths).toHaveLength(1);
    // At most a low and a high point per pixel column of the 400 px chart.
    const points = g.loggedPaths[0].split(/[ML]/).filter(Boolean).length;
    expect(points).toBeLessThanOrEqual(2 * 400);
    expect(points).toBeGreaterThan(400);
    // The thinned line still spans the readings' full range.
    const ys = g.loggedPaths[0]
      .split(/[ML]/)
      .filter(Boolean)
      .map((s) => Number(s.split(',')[1]));
    expect(Math.min(...ys)).toBeLessThan(g.box.top + (g.box.bottom - g.box.top) * 0.6);
  });

  it('places the now line, and none when now is outside the batch', () => {
    const g = batchTemperatureGeometry(base, 400, 260);
    expect(g.nowX).toBeCloseTo(g.box.left + ((g.box.right - g.box.left) * 2) / 10, 9);
    expect(batchTemperatureGeometry({ ...base, nowH: -1 }, 400, 260).nowX).toBeNull();
  });
});

describe('forecastAccuracyGeometry', () => {
  it('uses one scale on both axes so the diagonal is measured = forecast', () => {
    const g = forecastAccuracyGeometry(
      [
        { id: 1, forecastGPerL: 40, measuredGPerL: 39 },
        { id: 2, forecastGPerL: 250, measuredGPerL: 255 },
      ],
      400,
      260,
    );
    expect(g.diagonal.x1).toBeCloseTo(g.box.left, 9);
    expect(g.diagonal.y1).toBeCloseTo(g.box.bottom, 9);
    expect(g.diagonal.y2).toBeCloseTo(g.box.top, 9);
    // A point under the diagonal was over-forecast: below it on screen means a larger y than the diagonal there.
    const d = g.dots[0];
    const t = (d.x - g.diagonal.x1) / (g.diagonal.x2 - g.diagonal.x1);
    expect(d.y).toBeGreaterThan(g.diagonal.y1 + t * (g.diagonal.y2 - g.diagonal.y1));
    expect(g.meanBias).toBeCloseTo((39 / 40 - 1 + 255 / 250 - 1) / 2, 12);
  });

  it('has no bias and no dots without closed batches', () => {
    const g = forecastAccuracyGeometry([], 400, 260);
    expect(g.dots).toEqual([]);
    expect(g.meanBias).toBeNull();
  });
});
