import { describe, expect, it } from 'vitest';
import { batchStatus, readingCaution, readingsExplained } from '../../src/batches';
import type { BatchProgram } from '../../src/contracts/batches';

const vessel = { name: 'R-101', minC: 20, maxC: 75 };

describe('a reading that asks for a second look', () => {
  it('outside the vessel range or 10 °C or more from the last (common practice, no source)', () => {
    expect(readingCaution(95, vessel, 59)).toBe('95.0 °C is above R-101’s maximum of 75.0 °C.');
    expect(readingCaution(12, vessel, null)).toBe('12.0 °C is below R-101’s minimum of 20.0 °C.');
    expect(readingCaution(48, vessel, 59)).toBe('48.0 °C is 11.0 °C from the last reading of 59.0 °C.');
    expect(readingCaution(60.5, vessel, 59)).toBeNull();
    expect(readingCaution(75, vessel, null)).toBeNull();
  });
});

// The program of tests/batches/status.test.ts (science notes, check value 17): 60 °C held for 6 h.
const program: BatchProgram = {
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

describe('what the readings do to the forecast', () => {
  it('holds for the engine: a last reading changes nothing yet; a same-minute spike counts for its seconds only', () => {
    const on = [
      { h: 1, c: 60 },
      { h: 2, c: 60 },
    ];
    const base = batchStatus(program, on, 2).forecastGPerL;
    // 95 °C logged last: the plan is assumed from it on, so the forecast is the same.
    expect(batchStatus(program, [...on, { h: 2, c: 95 }], 2).forecastGPerL).toBeCloseTo(base, 6);
    const m = 1 / 60;
    const spike = batchStatus(program, [...on, { h: 2 + 0.2 * m, c: 95 }, { h: 2 + 0.4 * m, c: 95 }, { h: 2 + 0.6 * m, c: 60 }], 2).activityLeft;
    const held = batchStatus(program, [...on, { h: 2.01, c: 95 }, { h: 3, c: 95 }, { h: 3.01, c: 60 }], 3).activityLeft;
    const plain = batchStatus(program, [...on, { h: 2 + 0.6 * m, c: 60 }], 2).activityLeft;
    // Ed 300 kJ/mol: at 95 °C the half-life is a fraction of a second (Arrhenius from 1 h at 60 °C), so even the
    // spike's seconds cost activity; held for an hour, next to nothing is left.
    expect(spike).toBeLessThan(plain);
    expect(held).toBeLessThan(spike);
    const lines = readingsExplained(
      [...on, { h: 2 + 0.2 * m, c: 95 }, { h: 2 + 0.4 * m, c: 95 }, { h: 2 + 0.6 * m, c: 60 }],
      (rs) => batchStatus(program, [...rs], 2).forecastGPerL,
    );
    expect(lines[2]).toMatch(
      /^4 readings within one minute \(60\.0–95\.0 °C\) make a spike of almost no duration: it counts only for those seconds\. Forecast [\d.]+ g\/L with them, [\d.]+ g\/L with only the first\.$/,
    );
  });

  it('says the last reading counts for no time and names a same-minute spike', () => {
    const m = 1 / 60;
    const lines = readingsExplained([
      { h: 1, c: 59 },
      { h: 1 + 0.2 * m, c: 95 },
      { h: 1 + 0.5 * m, c: 95 },
      { h: 1.5, c: 59 },
    ]);
    expect(lines[1]).toBe('The last reading, 59.0 °C, counts for no time until the next one is logged.');
    expect(lines[2]).toBe('3 readings within one minute (59.0–95.0 °C) make a spike of almost no duration: it counts only for those seconds.');
    expect(readingsExplained([])).toEqual(['No readings yet: the forecast is the plan.']);
  });
});
