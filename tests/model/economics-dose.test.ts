import { describe, expect, it } from 'vitest';
import { degreeHoursAbove, economics, optimizeEconomics, profitCurve, simulate, thermalDose, type EconomicsParams } from '../../src/model';

const enzyme = { tRefC: 60, vmaxRef: 2, eaKJPerMol: 50, kdRefPerH: Math.LN2, edKJPerMol: 300 };
const substrate = { s0GPerL: 100, kmGPerL: 5 };
const econ: EconomicsParams = {
  productPricePerKg: 2,
  volumeL: 10000,
  enzymeCostPerBatch: 50,
  heatingCostPerDegCHour: 0.5,
  ambientC: 20,
  turnaroundH: 4,
};

describe('economics', () => {
  it('adds up revenue and costs for one batch', () => {
    const r = economics(enzyme, substrate, 24, { setpointC: 48 }, econ);
    const p = simulate(enzyme, substrate, 24, { setpointC: 48 }).productGPerL;
    expect(r.revenue).toBeCloseTo(((p * 10000) / 1000) * 2, 9);
    expect(r.heatingCost).toBeCloseTo(0.5 * 28 * 24, 9);
    expect(r.profitPerH).toBeCloseTo((r.revenue - 50 - r.heatingCost) / 28, 9);
  });
  it.each([
    ['setpoint', { setpointC: 50 }, 30 * 10],
    [
      'stages',
      {
        stages: [
          { hours: 4, c: 30 },
          { hours: 6, c: 10 },
        ],
      },
      40,
    ],
    [
      'log crossing ambient',
      {
        log: [
          { h: 0, c: 10 },
          { h: 2, c: 30 },
          { h: 4, c: 30 },
        ],
      },
      5 + 20 + 10 * 6,
    ],
  ] as const)('degree-hours above ambient for a %s', (_n, temp, expected) => {
    expect(degreeHoursAbove(temp, 10, 20)).toBeCloseTo(expected, 12);
  });
  it('the joint optimum beats its neighbours in batch length and setpoint', () => {
    const best = optimizeEconomics(enzyme, substrate, [30, 70], [2, 120], econ);
    expect(best.atBound.batch).toBeNull();
    for (const db of [-0.5, 0.5])
      for (const dc of [-0.3, 0, 0.3]) {
        const other = economics(enzyme, substrate, best.batchH + db, { setpointC: best.setpointC + dc }, econ);
        expect(other.profitPerH).toBeLessThanOrEqual(best.profitPerH + 1e-9);
      }
  });
  it('heating cost pulls the setpoint below the product optimum', () => {
    const free = optimizeEconomics(enzyme, substrate, [30, 70], [2, 120], { ...econ, heatingCostPerDegCHour: 0 });
    const costly = optimizeEconomics(enzyme, substrate, [30, 70], [2, 120], { ...econ, heatingCostPerDegCHour: 5 });
    expect(costly.setpointC).toBeLessThan(free.setpointC);
  });
  it('longer turnaround favours longer batches', () => {
    const a = optimizeEconomics(enzyme, substrate, [30, 70], [1, 200], { ...econ, turnaroundH: 2 });
    const b = optimizeEconomics(enzyme, substrate, [30, 70], [1, 200], { ...econ, turnaroundH: 12 });
    expect(b.batchH).toBeGreaterThan(a.batchH);
  });
  it('profit curve peaks near the optimum batch length', () => {
    const best = optimizeEconomics(enzyme, substrate, [30, 70], [2, 120], econ);
    const curve = profitCurve(enzyme, substrate, [30, 70], [2, 5, 10, 20, 40, 80, 120], econ);
    const top = curve.reduce((m, r) => (r.profitPerH > m.profitPerH ? r : m));
    expect(top.profitPerH).toBeLessThanOrEqual(best.profitPerH + 1e-9);
    expect(curve).toHaveLength(7);
  });
});

describe('thermal dose', () => {
  const log = [
    { h: 0, c: 25 },
    { h: 1, c: 50 },
    { h: 6, c: 52 },
  ];
  it('forecast equals one simulation of the log followed by the plan', () => {
    const plan = {
      stages: [
        { hours: 6, c: 0 },
        { hours: 18, c: 49 },
      ],
    };
    const d = thermalDose(enzyme, substrate, log, plan, 24);
    const whole = simulate(enzyme, substrate, 24, { log: [...log, { h: 6, c: 49 }, { h: 24, c: 49 }] });
    expect(d.forecastProductGPerL).toBeCloseTo(whole.productGPerL, 10);
    expect(d.lastH).toBe(6);
  });
  it('product so far and activity equal a simulation up to the last reading', () => {
    const d = thermalDose(enzyme, substrate, log, { setpointC: 50 }, 24);
    const s = simulate(enzyme, substrate, 6, { log });
    expect(d.productGPerL).toBeCloseTo(s.productGPerL, 12);
    expect(d.residualActivity).toBeCloseTo(s.residualActivity, 12);
    expect(d.state.workGPerL).toBeCloseTo(s.workGPerL, 12);
  });
  it('a log held at the reference temperature has equivalent time equal to its length', () => {
    const d = thermalDose(
      enzyme,
      substrate,
      [
        { h: 0, c: 60 },
        { h: 3, c: 60 },
      ],
      { setpointC: 60 },
      10,
    );
    expect(d.equivalentHAtRef).toBeCloseTo(3, 12);
  });
  it('equivalent time does not need a non-zero kd', () => {
    const d = thermalDose(
      { ...enzyme, kdRefPerH: 0 },
      substrate,
      [
        { h: 0, c: 70 },
        { h: 1, c: 70 },
      ],
      { setpointC: 60 },
      2,
    );
    expect(d.equivalentHAtRef).toBeCloseTo(Math.exp(((300000 / 8.314462618) * 10) / (333.15 * 343.15)), 9);
    expect(d.residualActivity).toBe(1);
  });
});
