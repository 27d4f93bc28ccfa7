// Check values of ../shared/science.md ("Check values for tests"); status [V] published, [C] computed, [M] memory.
import { describe, expect, it } from 'vitest';
import {
  dValueFromKd,
  eaFromQ10,
  edFromZ,
  halfLifeFromKd,
  initialRateOptimumC,
  isothermalOptimumU,
  kdFromDValue,
  kdFromHalfLife,
  lambertW0,
  lethalRate,
  optimizeEconomics,
  optimizeProfile,
  optimizeSetpoint,
  q10FromEa,
  simulate,
  thermalDose,
  twoFractionResidual,
  waterSaturationPressureKPa,
  zFromEd,
  zFromEquivalentTimes,
} from '../../src/model';

const rel = (a: number, b: number) => Math.abs(a / b - 1);

describe('science.md check values', () => {
  it('#1 Ea for Q10 = 2 over 20 -> 30 degC is 51.216 kJ/mol ([C] Q10 definition)', () => {
    expect(eaFromQ10(2, 20)).toBeCloseTo(51.216, 3);
  });
  it('#2 Q10 for Ea 50 kJ/mol over 20 -> 30 degC is 1.9674 ([C])', () => {
    expect(q10FromEa(50, 20)).toBeCloseTo(1.9674, 4);
  });
  it('#3 Q10 near 2 for typical catalysis (30-70 kJ/mol) near room temperature (common practice, no source)', () => {
    expect(q10FromEa(30, 20)).toBeGreaterThan(1.4);
    expect(q10FromEa(70, 20)).toBeLessThan(3);
  });
  it('#5 kd 0.01 /min: t1/2 69.31 min and D 230.26 min ([C])', () => {
    expect(halfLifeFromKd(0.01)).toBeCloseTo(69.31, 2);
    expect(dValueFromKd(0.01)).toBeCloseTo(230.26, 2);
    expect(kdFromHalfLife(69.3147)).toBeCloseTo(0.01, 6);
    expect(kdFromDValue(230.2585)).toBeCloseTo(0.01, 6);
  });
  it('#6 lethal rate at 110 vs 121.11 degC, z 10 degC, is 0.0774 ([V] dairy F-value practice; [C])', () => {
    expect(lethalRate(110, 121.11, 10)).toBeCloseTo(0.0774, 4);
  });
  it('#7 63 degC/30 min == 72 degC/15 s implies z 4.329 degC and Ea 513 kJ/mol ([V] EFSA Journal 19(4):e06576 (2021); [C])', () => {
    const z = zFromEquivalentTimes(63, 30 * 60, 72, 15);
    expect(z).toBeCloseTo(4.329, 3);
    expect(edFromZ(z, 63, 72)).toBeCloseTo(513, 0);
  });
  it('#8 broccoli peroxidase D 6.5 min at 70, 0.4 min at 90 degC: z 16.52, Ea 144 kJ/mol, kd(70) 0.354 /min ([V] Goncalves et al. 2009; [C])', () => {
    const z = zFromEquivalentTimes(70, 6.5, 90, 0.4);
    expect(z).toBeCloseTo(16.52, 2);
    expect(edFromZ(z, 70, 90)).toBeCloseTo(144, 0);
    expect(kdFromDValue(6.5)).toBeCloseTo(0.354, 3);
  });
  it('#9 lactoperoxidase 70-77 degC: Ed 642 kJ/mol is consistent with z 3.58 degC within 2 % ([V] Dumitrascu et al. 2012)', () => {
    expect(rel(zFromEd(642, 70, 77), 3.58)).toBeLessThan(0.02);
    expect(rel(zFromEd(642, 73, 73), 3.58)).toBeLessThan(0.02);
  });
  it.each([
    [1, 0.567143290409784],
    [Math.E, 1],
    [10, 1.745528002740699],
  ])('#10 W0(%f) = %f ([C] scipy.special.lambertw)', (x, w) => {
    expect(rel(lambertW0(x), w)).toBeLessThan(1e-15);
  });
  // #11-12: units are mM and min in the source; the engine is unit-consistent, so g/L and h stand in for them.
  it('#11 integrated MM, Km 2, Vmax 0.1 /min, S0 1, no decay: S(30 min) = 0.314370 ([C]; renz vignette setting)', () => {
    const r = simulate({ tRefC: 30, vmaxRef: 0.1, eaKJPerMol: 50, kdRefPerH: 0, edKJPerMol: 300 }, { s0GPerL: 1, kmGPerL: 2 }, 30, { setpointC: 30 });
    expect(1 - r.productGPerL).toBeCloseTo(0.31437, 6);
  });
  it('#12 same with kd 0.01 /min: S(120 min) = 0.048876 and S(infinity) = 0.011048 ([C])', () => {
    const e = { tRefC: 30, vmaxRef: 0.1, eaKJPerMol: 50, kdRefPerH: 0.01, edKJPerMol: 300 };
    const s = { s0GPerL: 1, kmGPerL: 2 };
    expect(1 - simulate(e, s, 120, { setpointC: 30 }).productGPerL).toBeCloseTo(0.048876, 6);
    expect(1 - simulate(e, s, 1e5, { setpointC: 30 }).productGPerL).toBeCloseTo(0.011048, 6);
  });
  it('#13 x at the isothermal optimum for Ea/Ed = 1/6 is 0.354199, activity left 0.7017 ([C])', () => {
    const u = isothermalOptimumU(1 / 6);
    expect(u).toBeCloseTo(0.354199, 6);
    expect(Math.exp(-u)).toBeCloseTo(0.7017, 4);
  });
  const case14 = { tRefC: 60, vmaxRef: 1, eaKJPerMol: 50, kdRefPerH: Math.LN2, edKJPerMol: 300 };
  const saturating = { s0GPerL: 1e9, kmGPerL: 1e-6 };
  it('#14 isothermal optimum, Ea 50, Ed 300, t1/2 1 h at 60 degC, 24 h, saturating: 48.565 degC ([C])', () => {
    const o = optimizeSetpoint(case14, saturating, 24, [0, 100]);
    expect(Math.abs(o.setpointC - 48.565)).toBeLessThan(0.001);
    expect(o.atBound).toBeNull();
  });
  it('#15 best batch length with turnaround 4 h and Ed/Ea = 6 is 20 h ([C])', () => {
    const o = optimizeEconomics({ ...case14, edKJPerMol: 300 }, saturating, [0, 120], [1, 200], {
      productPricePerKg: 1,
      volumeL: 1000,
      enzymeCostPerBatch: 0,
      heatingCostPerDegCHour: 0,
      ambientC: 20,
      turnaroundH: 4,
    });
    expect(Math.abs(o.batchH - 20)).toBeLessThan(1e-3);
  });
  it('#16 best profile gain over best isothermal, case 14, bounds 40-80 degC: +4.6 to 4.7 % ([C]) reached by a 96-stage profile', () => {
    const p = optimizeProfile(case14, saturating, 24, [40, 80], 96, 40);
    expect(p.gainFraction).toBeGreaterThan(0.046);
    expect(p.gainFraction).toBeLessThan(0.047);
  });
  it('#17 thermal dose of ramp 20->60 in 30 min, 5 h hold, cool in 30 min: 5.0755 h at 60 degC, activity 0.02966 ([C])', () => {
    const log = [
      { h: 0, c: 20 },
      { h: 0.5, c: 60 },
      { h: 5.5, c: 60 },
      { h: 6, c: 20 },
    ];
    const d = thermalDose(case14, { s0GPerL: 100, kmGPerL: 5 }, log, { setpointC: 20 }, 6);
    expect(d.equivalentHAtRef).toBeCloseTo(5.0755, 4);
    expect(d.residualActivity).toBeCloseTo(0.02966, 5);
  });
  it('#18 two-fraction decay at 100 degC after 1 min: 0.93 at 8.9 /min + 0.07 at 0.23 /min = 0.0557 ([V] Naveh et al. 1982; [C])', () => {
    expect(twoFractionResidual(0.93, 8.9, 0.07, 0.23, 1)).toBeCloseTo(0.0557, 4);
  });
  it('#19 Equilibrium Model initial-rate optimum, dGcat 70, dHeq 150 kJ/mol, Teq 57 degC: 56.636 degC ([C])', () => {
    const c = initialRateOptimumC({ dGcatKJPerMol: 70 }, { teqC: 57, dHeqKJPerMol: 150 }, [20, 90]);
    expect(Math.abs(c - 56.636)).toBeLessThan(0.001);
  });
  it.each([
    [100, 101.42, 0.01],
    [105, 120.9, 0.1],
    [148, 451.1, 0.1],
  ])('#20 water saturation pressure at %f degC is %f kPa abs ([C] IAPWS-IF97)', (c, p, tol) => {
    expect(Math.abs(waterSaturationPressureKPa(c) - p)).toBeLessThanOrEqual(tol);
  });
  it.each([
    [300 - 273.15, 0.353658941e-2],
    [500 - 273.15, 0.263889776e1],
    [600 - 273.15, 0.123443146e2],
  ])('IAPWS-IF97 region 4 verification values at %f degC: %f MPa ([M] IF97 release, table 35)', (c, mpa) => {
    expect(rel(waterSaturationPressureKPa(c) / 1000, mpa)).toBeLessThan(1e-8);
  });
});
