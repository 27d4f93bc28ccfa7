import type { CalibrationBatch, CalibrationInput } from './calibrate';
import { ModelInputError } from './errors';
import { inputArray, inputNumber, inputObject, validateBatchH, validateCovariance, validateEnzyme, validateSubstrate, validateTemperature } from './validate';

/** Input of the calibrate command: prior (enzyme means, 3x3 covariance) and closed batches with measured product (g/L). */
export function validateCalibrateInput(v: unknown): CalibrationInput {
  const o = inputObject(v, 'input', ['enzyme', 'substrate', 'covariance', 'batches']);
  const enzyme = validateEnzyme(o.enzyme);
  if (!(enzyme.kdRefPerH > 0)) throw new ModelInputError('enzyme.kdRefPerH', 'must be > 0 for the calibrate command');
  const substrate = validateSubstrate(o.substrate);
  const covariance = validateCovariance(o.covariance);
  if (covariance.length !== 3) throw new ModelInputError('covariance', 'must be 3x3 (ln kdRefPerH, edKJPerMol, ln vmaxScale)');
  const batches = inputArray(o.batches, 'batches', 0).map((item, i): CalibrationBatch => {
    const field = `batches[${i}]`;
    const b = inputObject(item, field, ['batchH', 'temperature', 'measuredProductGPerL', 'measurementSdGPerL']);
    return {
      batchH: validateBatchH(b.batchH, `${field}.batchH`),
      temperature: validateTemperature(b.temperature, `${field}.temperature`),
      measuredProductGPerL: inputNumber(b.measuredProductGPerL, `${field}.measuredProductGPerL`, { min: 0 }),
      measurementSdGPerL: inputNumber(b.measurementSdGPerL, `${field}.measurementSdGPerL`, { gt: 0 }),
    };
  });
  return { enzyme, substrate, covariance, batches };
}
