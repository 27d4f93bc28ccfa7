import fc from 'fast-check';
import { describe, it } from 'vitest';
import { optimizeProfile, optimizeSetpoint, simulate } from '../../src/model';

const params = { seed: 424242, numRuns: 60 };
const enzymeArb = fc.record({
  tRefC: fc.double({ min: 30, max: 70, noNaN: true }),
  vmaxRef: fc.double({ min: 0.01, max: 50, noNaN: true }),
  eaKJPerMol: fc.double({ min: 20, max: 120, noNaN: true }),
  kdRefPerH: fc.double({ min: 1e-3, max: 2, noNaN: true }),
  edKJPerMol: fc.double({ min: 150, max: 900, noNaN: true }),
});
const substrateArb = fc.record({
  s0GPerL: fc.double({ min: 1, max: 500, noNaN: true }),
  kmGPerL: fc.double({ min: 0.01, max: 500, noNaN: true }),
});

describe('properties (fast-check, fixed seed)', () => {
  it('product never falls as the batch grows', () => {
    fc.assert(
      fc.property(enzymeArb, substrateArb, fc.double({ min: 0.5, max: 100, noNaN: true }), fc.double({ min: 1.01, max: 3, noNaN: true }), (e, s, b, f) => {
        const t = { setpointC: e.tRefC - 5 };
        return simulate(e, s, b * f, t).productGPerL >= simulate(e, s, b, t).productGPerL;
      }),
      params,
    );
  });
  it('product never falls as the dose grows', () => {
    fc.assert(
      fc.property(enzymeArb, substrateArb, fc.double({ min: 0.5, max: 100, noNaN: true }), fc.double({ min: 1.01, max: 3, noNaN: true }), (e, s, b, f) => {
        const t = { setpointC: e.tRefC };
        return simulate({ ...e, vmaxRef: e.vmaxRef * f }, s, b, t).productGPerL >= simulate(e, s, b, t).productGPerL;
      }),
      params,
    );
  });
  it('the isothermal optimum falls as the batch grows', () => {
    fc.assert(
      fc.property(enzymeArb, fc.double({ min: 0.5, max: 100, noNaN: true }), fc.double({ min: 1.05, max: 3, noNaN: true }), (e, b, f) => {
        const s = { s0GPerL: 100, kmGPerL: 10 };
        const short = optimizeSetpoint(e, s, b, [-50, 250]).setpointC;
        const long = optimizeSetpoint(e, s, b * f, [-50, 250]).setpointC;
        return long < short;
      }),
      params,
    );
  });
  it('a staged profile never loses to the best isothermal setpoint', () => {
    fc.assert(
      fc.property(
        enzymeArb,
        substrateArb,
        fc.double({ min: 1, max: 100, noNaN: true }),
        fc.integer({ min: 1, max: 12 }),
        fc.double({ min: 0, max: 10, noNaN: true }),
        (e, s, b, n, step) => {
          const bounds: [number, number] = [e.tRefC - 25, e.tRefC + 10];
          const p = optimizeProfile(e, s, b, bounds, n, step);
          return p.productGPerL >= p.isothermal.productGPerL * (1 - 1e-12);
        },
      ),
      { seed: 777, numRuns: 40 },
    );
  });
});
