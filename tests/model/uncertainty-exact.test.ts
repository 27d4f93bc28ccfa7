// The robust setpoint's faster evaluation (bounds on ln work, only the draws that can decide a percentile evaluated)
// against the plain evaluation of every draw at every setpoint, and the sampled selection against a sort.
import { describe, expect, it } from 'vitest';
import { createRng, quantileSorted, quantilesBySelection, type UncertaintyInput } from '../../src/model';
import { monteCarloSteps } from '../../src/model/uncertainty';
import { kthSmallest } from '../../src/model/random';

function run(input: UncertaintyInput, exhaustive: boolean) {
  const it = monteCarloSteps(input, 1000, exhaustive);
  for (;;) {
    const s = it.next();
    if (s.done) return s.value;
  }
}

describe('bounded evaluation of the robust setpoint', () => {
  const enzyme = { tRefC: 60, vmaxRef: 8, eaKJPerMol: 50, kdRefPerH: Math.LN2, edKJPerMol: 300 };
  const substrate = { s0GPerL: 200, kmGPerL: 15 };
  const cases: [string, UncertaintyInput][] = [
    [
      'the bench case',
      {
        enzyme,
        substrate,
        batchH: 24,
        boundsC: [40, 60],
        covariance: [
          [0.0004, 0.02],
          [0.02, 4],
        ],
        sensorBiasSdC: 0.3,
        doseRelSd: 0.05,
        draws: 10000,
        seed: 1,
      },
    ],
    [
      'wide 3x3 covariance, clamped draws',
      {
        enzyme,
        substrate,
        batchH: 24,
        boundsC: [30, 70],
        covariance: [
          [0.09, 0.5, 0],
          [0.5, 900, 0],
          [0, 0, 400],
        ],
        sensorBiasSdC: 1,
        doseRelSd: 0.2,
        draws: 3000,
        seed: 7,
      },
    ],
    [
      'candidates inside wider bounds',
      {
        enzyme: { ...enzyme, kdRefPerH: 0.05 },
        substrate,
        batchH: 48,
        boundsC: [55, 75],
        candidatesC: [62, 64, 66, 68],
        covariance: [
          [0.01, 0.1],
          [0.1, 9],
        ],
        draws: 5000,
        seed: 3,
      },
    ],
    [
      'activity gone long before the end (kd t far above 40)',
      {
        enzyme: { ...enzyme, kdRefPerH: 50 },
        substrate,
        batchH: 200,
        boundsC: [40, 80],
        covariance: [
          [0.04, 0],
          [0, 25],
        ],
        draws: 2000,
        seed: 11,
      },
    ],
    [
      'hardly any loss (kd t far below e^-40)',
      {
        enzyme: { ...enzyme, kdRefPerH: 1e-25 },
        substrate,
        batchH: 10,
        boundsC: [20, 40],
        covariance: [
          [0.04, 0],
          [0, 25],
        ],
        draws: 2000,
        seed: 12,
      },
    ],
  ];
  for (const [name, input] of cases)
    it(`${name}: the same result as evaluating every draw`, () => {
      const fast = run(input, false);
      expect(fast.robust).not.toBeNull();
      expect(fast).toEqual(run(input, true));
    });
});

describe('selection by a sampled bracket (arrays of 1,024 and more)', () => {
  it('order statistics and type-7 quantiles equal those of the sorted values: continuous, tied, sorted and reversed', () => {
    const r = createRng(41);
    for (const n of [1024, 1500, 10000, 40001]) {
      const arrays = [
        Float64Array.from({ length: n }, () => r.normal()),
        Float64Array.from({ length: n }, () => Math.round(r.uniform() * 20)),
        Float64Array.from({ length: n }, (_, i) => i),
        Float64Array.from({ length: n }, (_, i) => n - i),
        Float64Array.from({ length: n }, (_, i) => (i < n / 2 ? 1 : r.uniform())),
      ];
      for (const v of arrays) {
        const sorted = Float64Array.from(v).sort();
        const ps = [0, 0.01, 0.1, 0.5, 0.9, 0.999, 1];
        expect(quantilesBySelection(v, ps, new Float64Array(n))).toEqual(ps.map((p) => quantileSorted(sorted, p)));
        for (const k of [0, 1, Math.floor(n / 3), n - 2, n - 1]) expect(kthSmallest(v, k, new Float64Array(n))).toBe(sorted[k]);
      }
    }
  });
});
