import { describe, expect, it } from 'vitest';
import { batchStatus, correctiveSetpoint, loggedHistory } from '../../src/batches';
import type { BatchProgram } from '../../src/contracts/batches';

// Science notes, check value 17 [C]: Ea 50, Ed 300 kJ/mol, t1/2 1 h at 60 degC; ramp 20->60 degC in 30 min,
// hold 5 h, cool to 20 degC in 30 min -> equivalent 5.0755 h at 60 degC, activity left 0.02966.
const plan: BatchProgram = {
  source: 'current_setpoint',
  planId: null,
  batchH: 6,
  stages: [{ hours: 6, c: 60 }],
  log: [
    { h: 0, c: 20 },
    { h: 0.5, c: 60 },
    { h: 5.5, c: 60 },
    { h: 6, c: 20 },
  ],
  fillC: 20,
  enzyme: { tRefC: 60, vmaxRef: 4, eaKJPerMol: 50, kdRefPerH: Math.LN2, edKJPerMol: 300 },
  substrate: { s0GPerL: 150, kmGPerL: 10 },
  plannedProductGPerL: 0,
  p10GPerL: null,
  vessel: { minC: 20, maxC: 80, hygienicMinC: 20 },
};

describe('batchStatus', () => {
  it('gives the thermal dose and activity of check value 17 when the readings are that history', () => {
    const s = batchStatus(plan, plan.log, 6);
    expect(s.equivalentHAtRef).toBeCloseTo(5.0755, 3);
    expect(s.activityLeft).toBeCloseTo(0.02966, 4);
    expect(s.refC).toBe(60);
  });

  it('assumes the plan before the first reading', () => {
    expect(loggedHistory(plan, [{ h: 1, c: 60 }])).toEqual([
      { h: 0, c: 20 },
      { h: 0.5, c: 60 },
      { h: 1, c: 60 },
    ]);
    // Readings on the plan give the plan's own forecast at every point of the batch.
    const full = batchStatus(plan, plan.log, 6).forecastGPerL;
    const partial = batchStatus(
      plan,
      [
        { h: 0.5, c: 60 },
        { h: 2, c: 60 },
      ],
      2,
    );
    expect(partial.forecastGPerL).toBeCloseTo(full, 9);
    expect(partial.productSoFarGPerL).toBeLessThan(full);
  });

  it('lowers the forecast after a hot excursion and says so through activity', () => {
    const onPlan = batchStatus(
      plan,
      [
        { h: 0.5, c: 60 },
        { h: 1, c: 60 },
        { h: 1.5, c: 60 },
      ],
      1.5,
    );
    const hot = batchStatus(
      plan,
      [
        { h: 0.5, c: 60 },
        { h: 1, c: 70 },
        { h: 1.5, c: 60 },
      ],
      1.5,
    );
    expect(hot.activityLeft).toBeLessThan(onPlan.activityLeft);
    expect(hot.equivalentHAtRef).toBeGreaterThan(onPlan.equivalentHAtRef);
  });
});

describe('correctiveSetpoint', () => {
  const long: BatchProgram = { ...plan, batchH: 24, stages: [{ hours: 24, c: 60 }], log: [{ h: 0, c: 60 }] };
  it('re-optimises the rest of the batch within the vessel and never does worse than the plan', () => {
    const s = batchStatus(
      long,
      [
        { h: 0, c: 60 },
        { h: 4, c: 66 },
      ],
      4,
      true,
    );
    const c = s.corrective!;
    expect(c.remainingH).toBeCloseTo(20, 9);
    expect(c.setpointC).toBeGreaterThanOrEqual(20);
    expect(c.setpointC).toBeLessThanOrEqual(80);
    expect(c.forecastGPerL).toBeGreaterThanOrEqual(c.planForecastGPerL - 1e-9);
  });

  it('offers nothing when too little of the batch is left', () => {
    expect(correctiveSetpoint(long, { workGPerL: 10, activity: 0.5 }, 23, 50)).toBeNull();
  });

  it('respects the hygienic minimum as the lower bound', () => {
    const c = correctiveSetpoint({ ...long, vessel: { minC: 20, maxC: 80, hygienicMinC: 70 } }, { workGPerL: 0, activity: 1 }, 0, 0)!;
    expect(c.setpointC).toBeGreaterThanOrEqual(70);
    expect(c.boundsC).toEqual([70, 80]);
  });
});
