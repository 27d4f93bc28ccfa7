import { readdirSync, readFileSync } from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { cli, ruleOf } from '../support/model';
import { simulate, validateProfileInput, validateSimulateInput, validateTemperature } from '../../src/model';

const root = path.resolve(__dirname, '../..');
const enzyme = { tRefC: 60, vmaxRef: 2, eaKJPerMol: 50, kdRefPerH: 0.693, edKJPerMol: 300 };
const substrate = { s0GPerL: 100, kmGPerL: 5 };

describe('input rules', () => {
  it.each([
    ['missing enzyme', { substrate, batchH: 1, temperature: { setpointC: 50 } }, 'enzyme: must be an object'],
    [
      'negative kd',
      { enzyme: { ...enzyme, kdRefPerH: -1 }, substrate, batchH: 1, temperature: { setpointC: 50 } },
      'enzyme.kdRefPerH: must be between 0 and 1000000',
    ],
    [
      'Km zero',
      { enzyme, substrate: { s0GPerL: 1, kmGPerL: 0 }, batchH: 1, temperature: { setpointC: 50 } },
      'substrate.kmGPerL: must be between 1e-9 and 1000000000',
    ],
    ['batch zero', { enzyme, substrate, batchH: 0, temperature: { setpointC: 50 } }, 'batchH: must be > 0'],
    ['kelvin setpoint', { enzyme, substrate, batchH: 1, temperature: { setpointC: 323 } }, 'temperature.setpointC: must be between -50 and 250'],
    [
      'two temperature kinds',
      { enzyme, substrate, batchH: 1, temperature: { setpointC: 50, stages: [] } },
      'temperature: must have exactly one of setpointC, stages, log',
    ],
    ['string number', { enzyme: { ...enzyme, vmaxRef: '2' }, substrate, batchH: 1, temperature: { setpointC: 50 } }, 'enzyme.vmaxRef: must be a finite number'],
  ])('%s', (_n, input, message) => {
    expect(ruleOf(() => validateSimulateInput(input))).toBe(message);
  });
  it('log readings must not go back in time', () => {
    expect(
      ruleOf(() =>
        validateTemperature({
          log: [
            { h: 1, c: 50 },
            { h: 0.5, c: 50 },
          ],
        }),
      ),
    ).toBe('temperature.log[1].h: must not be earlier than the reading before it');
  });
  it('profile stages must be a whole number', () => {
    expect(ruleOf(() => validateProfileInput({ enzyme, substrate, batchH: 24, boundsC: [40, 60], stages: 2.5, maxStepC: 1 }))).toBe(
      'stages: must be an integer',
    );
  });
  it('valid input passes through unchanged', () => {
    const input = { enzyme, substrate, batchH: 24, temperature: { setpointC: 50 } };
    expect(validateSimulateInput(input)).toEqual(input);
  });
});

describe('command line', () => {
  const enz = enzyme;
  it('fit where two fractions are not identified: prints every model, the singular one without standard errors (it refused the whole input)', () => {
    const points = [
      { c: 55, h: 1, residual: 0.9 },
      { c: 55, h: 1, residual: 0.88 },
      { c: 55, h: 2, residual: 0.8 },
      { c: 60, h: 1, residual: 0.8 },
      { c: 60, h: 2, residual: 0.63 },
      { c: 60, h: 2, residual: 0.66 },
      { c: 65, h: 1, residual: 0.6 },
      { c: 65, h: 2, residual: 0.37 },
    ];
    const r = cli('fit', { tRefC: 60, points });
    expect(r.stderr).toBe('');
    expect(r.code).toBe(0);
    const out = JSON.parse(r.stdout) as { chosen: string; models: { name: string; singular?: string; se: object; covariance: number[][] }[] };
    expect(out.models.map((m) => m.name)).toEqual(['first-order', 'first-order-a0', 'two-fraction']);
    const singular = out.models.filter((m) => m.singular);
    expect(singular.length).toBeGreaterThan(0);
    expect(singular.find((m) => m.singular!.startsWith('the fit is singular'))).toMatchObject({ se: {}, covariance: [] });
    expect(singular.map((m) => m.name)).not.toContain(out.chosen);
  });
  it.each([
    ['simulate', { enzyme: enz, substrate, batchH: 24, temperature: { setpointC: 50 } }, ['productGPerL', 'conversion', 'residualActivity']],
    ['optimize', { enzyme: enz, substrate, batchH: 24, boundsC: [40, 60] }, ['setpointC', 'productGPerL']],
    ['profile', { enzyme: enz, substrate, batchH: 24, boundsC: [40, 60], stages: 4, maxStepC: 2 }, ['stages', 'productGPerL']],
    [
      'fit',
      {
        tRefC: 60,
        points: [
          { c: 55, h: 1, residual: 0.9 },
          { c: 55, h: 2, residual: 0.8 },
          { c: 65, h: 1, residual: 0.5 },
          { c: 65, h: 2, residual: 0.26 },
        ],
      },
      ['kdRefPerH', 'edKJPerMol', 'halfLifeRefH', 'se'],
    ],
    [
      'dose',
      {
        enzyme: enz,
        substrate,
        batchH: 24,
        log: [
          { h: 0, c: 20 },
          { h: 1, c: 50 },
        ],
        plan: { setpointC: 50 },
      },
      ['equivalentHAtRef', 'forecastProductGPerL'],
    ],
    [
      'uncertainty',
      {
        enzyme: enz,
        substrate,
        batchH: 24,
        boundsC: [40, 60],
        covariance: [
          [0.001, 0.01],
          [0.01, 4],
        ],
        draws: 300,
        seed: 2,
      },
      ['candidates', 'robust', 'optimum'],
    ],
    [
      'economics',
      {
        enzyme: enz,
        substrate,
        boundsC: [30, 70],
        batchBoundsH: [2, 96],
        economics: { productPricePerKg: 2, volumeL: 1000, enzymeCostPerBatch: 10, heatingCostPerDegCHour: 0.1, ambientC: 20, turnaroundH: 4 },
        curvePoints: 5,
      },
      ['best', 'curve'],
    ],
  ] as const)('%s writes one JSON object with its fields', (command, input, fields) => {
    const r = cli(command, input);
    expect(r.stderr).toBe('');
    expect(r.code).toBe(0);
    const out = JSON.parse(r.stdout);
    for (const f of fields) expect(out).toHaveProperty(f);
  });
  it('simulate on the command line equals the library call', () => {
    const input = {
      enzyme: enz,
      substrate,
      batchH: 24,
      temperature: {
        stages: [
          { hours: 12, c: 48 },
          { hours: 12, c: 51 },
        ],
      },
    };
    const out = JSON.parse(cli('simulate', input).stdout);
    expect(out.productGPerL).toBe(simulate(enz, substrate, 24, input.temperature).productGPerL);
  });
  it.each([
    [
      'simulate',
      { enzyme: { ...enz, edKJPerMol: -5 }, substrate, batchH: 24, temperature: { setpointC: 50 } },
      'enzyme.edKJPerMol: must be between 0 and 3000',
    ],
    [
      'fit',
      {
        tRefC: 60,
        points: [
          { c: 60, h: 1, residual: 0.5 },
          { c: 60, h: 2, residual: 0.3 },
          { c: 60, h: 3, residual: 0.2 },
        ],
      },
      'points: needs at least two temperatures',
    ],
    ['simulate', 'not json', 'input: must be one JSON object'],
    ['explode', {}, 'command: must be one of simulate, optimize, profile, fit, fit-rates, convert, dose, uncertainty, economics, calibrate'],
  ])('%s with bad input exits 2 with one stderr line and no stdout', (command, input, line) => {
    const r = cli(command, input);
    expect(r.code).toBe(2);
    expect(r.stdout).toBe('');
    expect(r.stderr).toBe(`${line}\n`);
  });
});

describe('purity of src/model', () => {
  const dir = path.join(root, 'src/model');
  const files = readdirSync(dir).filter((f) => f.endsWith('.ts'));
  it.each(files)('%s imports only from src/model and touches no I/O or clock', (f) => {
    const text = readFileSync(path.join(dir, f), 'utf8');
    for (const m of text.matchAll(/from\s+'([^']+)'/g)) expect(m[1].startsWith('./')).toBe(true);
    expect(text).not.toMatch(/process\.|Date\.now|fetch\(|require\(|setTimeout/);
  });
});
