import { describe, expect, it } from 'vitest';
import type { PlanInputs } from '../../src/contracts/plans';
import { evaluatePlan, kdAtReference, planContext, planReasons, planSeries, timeToActivity, type PlanContext } from '../../src/planning';

const R = 8.314462618;

// Check value #14 of /work/shared/science.md ([C], SciPy): Ea 50, Ed 300 kJ/mol, half-life 1 h at 60 degC,
// 24 h batch, saturating substrate -> best isothermal setpoint 48.565 degC.
const case14 = (vessel: Partial<PlanContext['vessel']> = {}, fillC = 48.565): PlanContext =>
  planContext(
    { doseGPerL: 1, vmaxRefGPerLH: 1, edKJPerMol: 300, fillC },
    { tRefC: 60, eaKJPerMol: 50 },
    { certKdPerH: Math.LN2 / 1, certTempC: 60 },
    { minC: 40, maxC: 80, maxHeatCPerH: 1000, maxCoolCPerH: 1000, hygienicMinC: 40, workingVolumeL: 1000, ...vessel },
  );

const inputs = (over: Partial<PlanInputs> = {}): PlanInputs => ({
  recipeId: 1,
  lotId: 1,
  batchH: 24,
  turnaroundH: 4,
  doseGPerL: 1,
  // Saturating: S0 far above both Km and the work done.
  s0GPerL: 1e6,
  kmGPerL: 1e-3,
  productPricePerKg: 1,
  enzymePricePerKg: 1,
  heatingCostPerDegCHour: 0,
  currentSetpointC: 60,
  strategy: 'isothermal',
  stages: 4,
  maxStepC: 5,
  uncertainty: null,
  ...over,
});

describe('lot stability at the reference temperature', () => {
  it('is the certificate value when the certificate is at the reference temperature', () => {
    expect(kdAtReference({ certKdPerH: 0.05, certTempC: 60 }, 60, 300)).toBeCloseTo(0.05, 15);
  });
  it('moves with the Arrhenius factor of Ed between the two temperatures', () => {
    // kd(60) = kd(50) exp(-(Ed/R)(1/333.15 - 1/323.15)), written out here from the definition.
    const expected = 0.01 * Math.exp(-(300e3 / R) * (1 / 333.15 - 1 / 323.15));
    expect(kdAtReference({ certKdPerH: 0.01, certTempC: 50 }, 60, 300)).toBeCloseTo(expected, 12);
    expect(expected / 0.01).toBeGreaterThan(20);
  });
});

describe('evaluatePlan', () => {
  it('finds the published isothermal optimum (science check #14, 48.565 °C)', () => {
    const ev = evaluatePlan(case14(), inputs());
    expect(ev.outputs.setpointC).toBeCloseTo(48.565, 2);
    expect(ev.outputs.atBound).toBeNull();
  });

  it('scales Vmax with the dose', () => {
    const one = evaluatePlan(case14(), inputs());
    const two = evaluatePlan(case14(), inputs({ doseGPerL: 2 }));
    expect(two.enzyme.vmaxRef).toBe(2 * one.enzyme.vmaxRef);
    // Saturating substrate: product is the work done, which doubles with the dose.
    expect(two.outputs.predictedProductGPerL / one.outputs.predictedProductGPerL).toBeCloseTo(2, 6);
  });

  it('moves the setpoint down as the batch gets longer', () => {
    const sp = [6, 12, 24, 48, 96].map((b) => evaluatePlan(case14(), inputs({ batchH: b })).outputs.setpointC);
    for (let i = 1; i < sp.length; i++) expect(sp[i]).toBeLessThan(sp[i - 1]!);
  });

  it('never leaves the vessel range, for the setpoint or any stage', () => {
    for (const batchH of [0.2, 1, 24, 400]) {
      for (const strategy of ['isothermal', 'staged'] as const) {
        const ev = evaluatePlan(case14({ minC: 45, maxC: 52 }), inputs({ batchH, strategy }));
        const temps = [ev.outputs.setpointC, ...(ev.outputs.stages ?? []).map((s) => s.c)];
        for (const c of temps) {
          expect(c).toBeGreaterThanOrEqual(45);
          expect(c).toBeLessThanOrEqual(52);
        }
        expect(ev.outputs.constraintsMet).toBe(true);
      }
    }
    expect(evaluatePlan(case14({ minC: 45, maxC: 52 }), inputs({ batchH: 0.2 })).outputs.atBound).toBe('upper');
    expect(evaluatePlan(case14({ minC: 45, maxC: 52 }), inputs({ batchH: 400 })).outputs.atBound).toBe('lower');
  });

  it('includes the heat-up ramp at the vessel rate in the predicted product', () => {
    const fast = evaluatePlan(case14({ maxHeatCPerH: 1000 }, 20), inputs());
    const slow = evaluatePlan(case14({ maxHeatCPerH: 2 }, 20), inputs());
    expect(slow.plan.log[1]!.h).toBeCloseTo((fast.outputs.setpointC - 20) / 2, 9);
    expect(slow.outputs.predictedProductGPerL).toBeLessThan(fast.outputs.predictedProductGPerL);
  });

  it('shows the pressure caution with the saturation pressure above 100 °C (science check #20: 105 °C -> 120.9 kPa)', () => {
    // A lot that barely decays: the best setpoint is the vessel maximum.
    const ctx = { ...case14({ minC: 60, maxC: 105, hygienicMinC: 60 }), kdRefPerH: 1e-9 };
    const out = evaluatePlan(ctx, inputs()).outputs;
    expect(out.setpointC).toBe(105);
    expect(out.cautions.crossesBoiling).toBe(true);
    expect(out.cautions.saturationKPa).toBeCloseTo(120.9, 0);
    expect(planReasons(out, planSeries(evaluatePlan(ctx, inputs()), inputs()), 24, 4).join(' ')).toMatch(/Pressure caution.*121 kPa/);
  });

  it('says so when the plan sits below the hygienic minimum', () => {
    const out = evaluatePlan(case14({ hygienicMinC: 55 }), inputs()).outputs;
    expect(out.cautions.belowHygienicMin).toBe(true);
    expect(out.constraintsMet).toBe(false);
  });

  it('staged profile does at least as well as holding the best setpoint, ramps aside', () => {
    const ev = evaluatePlan(case14({ maxHeatCPerH: 1e6, maxCoolCPerH: 1e6 }), inputs({ strategy: 'staged', stages: 6, maxStepC: 10 }));
    expect(ev.outputs.stagedGain).toBeGreaterThan(0);
    // The stages rise (science notes: on the interior arc the temperature rises).
    const cs = ev.outputs.stages!.map((s) => s.c);
    for (let i = 1; i < cs.length; i++) expect(cs[i]).toBeGreaterThanOrEqual(cs[i - 1]! - 1e-9);
  });
});

describe('timeToActivity', () => {
  it('interpolates between trajectory points', () => {
    const pts = [
      { h: 0, c: 50, productGPerL: 0, activity: 1 },
      { h: 10, c: 50, productGPerL: 0, activity: 0.6 },
      { h: 20, c: 50, productGPerL: 0, activity: 0.4 },
    ];
    expect(timeToActivity(pts, 0.5)).toBeCloseTo(15, 12);
    expect(timeToActivity(pts, 0.1)).toBeNull();
  });
});
