import { describe, expect, it } from 'vitest';
import { unlabelledFigures } from '../e2e/screen-text-rules';

// The layout guard's text rules (tests/e2e/layout-guard.test.ts) on lines written for the purpose.
describe('screen text rules', () => {
  it('flags a clock time without a zone and passes one with a zone', () => {
    expect(unlabelledFigures('last reading 09:05')).toEqual(['time without a zone: "last reading 09:05"']);
    expect(unlabelledFigures('last reading 09:05 CET')).toEqual([]);
  });

  it('does not read a certificate thumbprint as a clock time, whatever its hex pairs', () => {
    // A thumbprint of this shape (a letter, then digit pairs, then a full stop) failed the guard once at random.
    const line = 'Its user certificate: SHA-1 FF:1F:FB:D4:26:BB:8E:40:1D:18:8F:73:5A:5F:FD:A8:94:5B:C0:80.';
    expect(unlabelledFigures(line)).toEqual([]);
    expect(unlabelledFigures(`${line} Checked 14:02`)).toEqual([`time without a zone: "${line} Checked 14:02"`]);
  });
});
