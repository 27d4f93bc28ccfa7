import { describe, expect, it } from 'vitest';
import type { PlanInputs } from '../../src/contracts/plans';
import { COMPLETE_CONVERSION, conversionCompleteAtH, evaluatePlan, planContext, planReasons, planSeries } from '../../src/planning';

// The demo's glucose recipe (invented figures): Amylo GA-17, Ea 55 kJ/mol at 60 °C, half-life 26 h at 60 °C, Ed 300.
const ctx = planContext(
  { doseGPerL: 0.6, vmaxRefGPerLH: 7.5, edKJPerMol: 300, fillC: 45 },
  { tRefC: 60, eaKJPerMol: 55 },
  { certKdPerH: Math.LN2 / 26, certTempC: 60 },
  { minC: 20, maxC: 75, maxHeatCPerH: 12, maxCoolCPerH: 8, hygienicMinC: 50, workingVolumeL: 40000 },
);
const inputs = (over: Partial<PlanInputs> = {}): PlanInputs => ({
  recipeId: 1,
  lotId: 1,
  batchH: 48,
  turnaroundH: 6,
  doseGPerL: 0.6,
  s0GPerL: 300,
  kmGPerL: 2,
  productPricePerKg: 0.45,
  enzymePricePerKg: 18,
  heatingCostPerDegCHour: 0.8,
  currentSetpointC: 59,
  strategy: 'isothermal',
  stages: 4,
  maxStepC: 4,
  uncertainty: null,
  ...over,
});

describe('the hour conversion completes', () => {
  it('matches the integrated Michaelis-Menten equation with first-order enzyme decay', () => {
    // Integrated Michaelis-Menten equation (any enzyme-kinetics textbook, e.g. Bisswanger, Enzyme Kinetics, ch. 2):
    // S0 - S + Km ln(S0/S) = work; with activity e^(-kd t) at constant T the work is Vmax (1 - e^(-kd t)) / kd.
    // At S = (1 - 0.999) S0 that gives t = -ln(1 - kd W / Vmax) / kd, W = 0.999 S0 + Km ln 1000.
    const enzyme = { tRefC: 60, vmaxRef: 9, eaKJPerMol: 55, kdRefPerH: 0.02, edKJPerMol: 300 };
    const substrate = { s0GPerL: 300, kmGPerL: 2 };
    const log = [
      { h: 0, c: 60 },
      { h: 96, c: 60 },
    ];
    const w = COMPLETE_CONVERSION * 300 + 2 * Math.log(1 / (1 - COMPLETE_CONVERSION));
    const expected = -Math.log(1 - (0.02 * w) / 9) / 0.02;
    expect(conversionCompleteAtH(enzyme, substrate, 96, log)).toBeCloseTo(expected, 6);
    // Not complete by the end of a batch shorter than that.
    expect(conversionCompleteAtH(enzyme, substrate, expected - 0.5, log)).toBeNull();
  });
});

describe('the batch that finishes early', () => {
  it('keeps the current setpoint, says when conversion completes and what the shorter batch earns per reactor hour', () => {
    // Dose 0.9 g/L converts all 300 g/L well before hour 48 at the current 59 °C.
    const ev = evaluatePlan(ctx, inputs({ doseGPerL: 0.9 }));
    const o = ev.outputs;
    expect(o.setpointC).toBe(59);
    expect(o.gainOverCurrent).toBe(0);
    expect(o.atBound).toBeNull();
    const e = o.earlyFinish!;
    expect(e.completeAtH).toBeLessThan(48);
    expect(e.currentCompleteAtH).toBeCloseTo(e.completeAtH, 9);
    expect(o.predictedProductGPerL).toBeGreaterThanOrEqual(COMPLETE_CONVERSION * 300);
    // The shorter batch makes the same product in fewer reactor hours (and less heating): it earns more per hour.
    expect(e.shorterProfitPerH).toBeGreaterThan(e.fullProfitPerH);
    expect(e.fullProfitPerH).toBeCloseTo(o.profitPerH, 9);
    const reasons = planReasons(o, planSeries(ev, inputs({ doseGPerL: 0.9 })), 48, 6);
    expect(reasons[0]).toMatch(
      new RegExp(
        `^The substrate is fully converted by hour ${e.completeAtH.toFixed(1)} at 59\\.0 °C; .* would earn ${e.shorterProfitPerH.toFixed(0)} per reactor hour`,
      ),
    );
    expect(reasons.join(' ')).toMatch(/No setpoint change/);
  });

  it('says nothing of an early finish when the substrate lasts the batch, and recommends as before', () => {
    const o = evaluatePlan(ctx, inputs()).outputs;
    expect(o.earlyFinish).toBeNull();
    expect(o.predictedProductGPerL).toBeLessThan(COMPLETE_CONVERSION * 300);
    expect(Math.abs(o.setpointC - 59)).toBeGreaterThan(0.1);
  });
});
