import { describe, expect, it } from 'vitest';
import { deviationRun, forecastDeviation, readingDeviations, runDeviations, signalLostDeviation, type ReadingRules } from '../../src/batches';

// Plan: 50 degC flat; band +-1.5 degC and a 30 min gap limit (the site defaults); vessel maximum 60 degC.
const rules: ReadingRules = { toleranceC: 1.5, gapLimitMin: 30, vesselMaxC: 60, plannedAt: () => 50 };

describe('readingDeviations', () => {
  const cases: { name: string; prev: { h: number; c: number } | null; p: { h: number; c: number }; kinds: string[] }[] = [
    { name: 'in band, on time', prev: { h: 1, c: 50 }, p: { h: 1.25, c: 51.4 }, kinds: [] },
    { name: 'exactly on the band edge is inside', prev: { h: 1, c: 50 }, p: { h: 1.25, c: 51.5 }, kinds: [] },
    { name: 'just above the band', prev: { h: 1, c: 50 }, p: { h: 1.25, c: 51.6 }, kinds: ['band'] },
    { name: 'below the band', prev: { h: 1, c: 50 }, p: { h: 1.25, c: 48.4 }, kinds: ['band'] },
    { name: 'still out of band: same excursion, no new deviation', prev: { h: 1, c: 53 }, p: { h: 1.25, c: 53.5 }, kinds: [] },
    { name: 'first reading out of band', prev: null, p: { h: 0.25, c: 45 }, kinds: ['band'] },
    { name: 'above the vessel maximum replaces the band deviation', prev: { h: 1, c: 50 }, p: { h: 1.25, c: 61 }, kinds: ['vessel_max'] },
    { name: 'still above the maximum: same episode', prev: { h: 1, c: 61 }, p: { h: 1.25, c: 62 }, kinds: [] },
    { name: 'back below the maximum but out of band starts a band episode', prev: { h: 1, c: 61 }, p: { h: 1.25, c: 55 }, kinds: ['band'] },
    { name: 'gap of exactly the limit is allowed', prev: { h: 1, c: 50 }, p: { h: 1.5, c: 50 }, kinds: [] },
    { name: 'gap over the limit', prev: { h: 1, c: 50 }, p: { h: 1.6, c: 50 }, kinds: ['gap'] },
    { name: 'first reading late after the start', prev: null, p: { h: 0.75, c: 50 }, kinds: ['gap'] },
    { name: 'gap and excursion together', prev: { h: 1, c: 50 }, p: { h: 2, c: 47 }, kinds: ['gap', 'band'] },
  ];
  it.each(cases)('$name', ({ prev, p, kinds }) => {
    expect(readingDeviations(rules, prev, p).map((d) => d.kind)).toEqual(kinds);
  });

  it('compares with the planned temperature at the reading time (a ramp)', () => {
    const ramp: ReadingRules = { ...rules, plannedAt: (h) => 20 + 10 * h };
    expect(readingDeviations(ramp, { h: 1, c: 30 }, { h: 1.5, c: 35 }).map((d) => d.kind)).toEqual([]);
    const d = readingDeviations(ramp, { h: 1, c: 30 }, { h: 1.5, c: 30 });
    expect(d.map((x) => x.kind)).toEqual(['band']);
    expect(d[0].expectedC).toBe(35);
    expect(d[0].message).toMatch(/5\.0 °C below the planned 35\.0 °C/);
  });

  it('uses the site tolerance', () => {
    expect(readingDeviations({ ...rules, toleranceC: 0.5 }, { h: 1, c: 50 }, { h: 1.1, c: 50.7 }).map((d) => d.kind)).toEqual(['band']);
  });
});

describe('deviationRun', () => {
  it('fed a piece at a time answers what one run over the whole gives, indexed in the whole run', () => {
    // Invented readings around the 50 degC plan with excursions and a gap, merged into stored ones.
    const stored = [0.1, 0.6, 1.1, 3.4].map((h) => ({ h, c: 50 }));
    const added = Array.from({ length: 60 }, (_, k) => ({ h: 0.2 + k * 0.1 + (k > 40 ? 1 : 0), c: k % 7 === 3 ? 53 : k % 11 === 5 ? 61 : 50 }));
    const whole = runDeviations(rules, stored, added);
    expect(whole.length).toBeGreaterThan(5);
    const run = deviationRun(rules, stored);
    const pieces = [added.slice(0, 7), added.slice(7, 30), [], added.slice(30)].flatMap((piece) => run(piece));
    expect(pieces).toEqual(whole);
  });
});

describe('runDeviations', () => {
  it('takes the stored reading before each new one as its predecessor', () => {
    const stored = [
      { h: 0, c: 50 },
      { h: 0.25, c: 50 },
      { h: 2, c: 50 },
    ];
    // 0.5 follows 0.25 (in time), 0.6 follows 0.5; 2.2 follows the stored 2.0.
    const out = runDeviations(rules, stored, [
      { h: 0.5, c: 55 },
      { h: 0.6, c: 56 },
      { h: 2.2, c: 50 },
    ]);
    expect(out.map((o) => [o.index, o.draft.kind])).toEqual([[0, 'band']]);
  });
});

describe('forecastDeviation', () => {
  it.each([
    { p10: 40, forecast: 39.9, active: false, raised: true },
    { p10: 40, forecast: 40, active: false, raised: false },
    { p10: 40, forecast: 30, active: true, raised: false },
    { p10: null, forecast: 1, active: false, raised: false },
  ])('P10 $p10, forecast $forecast, one already active $active -> raised $raised', ({ p10, forecast, active, raised }) => {
    expect(forecastDeviation(p10, forecast, active, 3) !== null).toBe(raised);
  });
});

describe('signalLostDeviation', () => {
  // The same limit as a gap between readings (common practice, no source): silence up to it is allowed.
  it('is raised only when the link has been silent for longer than the gap limit, at the last good value', () => {
    expect(signalLostDeviation(30, 2, 2.5, 'BadSensorFailure')).toBeNull();
    const d = signalLostDeviation(30, 2, 2.51, 'BadSensorFailure')!;
    expect(d).toMatchObject({ kind: 'signal_lost', h: 2, valueC: null, expectedC: null });
    expect(d.message).toMatch(/31 min \(BadSensorFailure\).*30 min/);
  });
});
