import { KELVIN_OFFSET, R } from './constants';

const LN2 = Math.LN2;
const LN10 = Math.LN10;

/** degC to kelvin. */
export function toKelvin(c: number): number {
  return c + KELVIN_OFFSET;
}

/** Kelvin to degC. */
export function toCelsius(k: number): number {
  return k - KELVIN_OFFSET;
}

/** Half-life from a first-order rate constant; time unit is the inverse of kd's. */
export function halfLifeFromKd(kd: number): number {
  return LN2 / kd;
}

/** First-order rate constant from a half-life; 1/(time unit of the half-life). */
export function kdFromHalfLife(halfLife: number): number {
  return LN2 / halfLife;
}

/** Decimal reduction time D = ln10/kd; time unit is the inverse of kd's. */
export function dValueFromKd(kd: number): number {
  return LN10 / kd;
}

/** First-order rate constant from a D-value; 1/(time unit of D). */
export function kdFromDValue(d: number): number {
  return LN10 / d;
}

/** Rate constant in 1/h from the residual activity (fraction) left after `minutes` at one temperature. */
export function kdPerHFromResidual(residual: number, minutes: number): number {
  return -Math.log(residual) / (minutes / 60);
}

/** z-value in degC from an inactivation activation energy (kJ/mol) between two temperatures (degC). */
export function zFromEd(edKJPerMol: number, t1C: number, t2C: number): number {
  return (LN10 * R * (t1C + KELVIN_OFFSET) * (t2C + KELVIN_OFFSET)) / (edKJPerMol * 1000);
}

/** Inactivation activation energy in kJ/mol from a z-value (degC) between two temperatures (degC). */
export function edFromZ(zC: number, t1C: number, t2C: number): number {
  return (LN10 * R * (t1C + KELVIN_OFFSET) * (t2C + KELVIN_OFFSET)) / zC / 1000;
}

/** z-value in degC from two equally lethal treatments (or two D-values): time1 at t1C equals time2 at t2C. */
export function zFromEquivalentTimes(t1C: number, time1: number, t2C: number, time2: number): number {
  return (t2C - t1C) / Math.log10(time1 / time2);
}

/** Lethal rate 10^((T - Tref)/z) relative to the reference temperature (dimensionless; degC in). */
export function lethalRate(c: number, refC: number, zC: number): number {
  return Math.pow(10, (c - refC) / zC);
}

/** Q10 over t1C -> t1C + 10 degC for an activation energy in kJ/mol. */
export function q10FromEa(eaKJPerMol: number, t1C: number): number {
  const t1 = t1C + KELVIN_OFFSET;
  return Math.exp((10 * eaKJPerMol * 1000) / (R * t1 * (t1 + 10)));
}

/** Activation energy in kJ/mol implied by a Q10 over t1C -> t1C + 10 degC. */
export function eaFromQ10(q10: number, t1C: number): number {
  const t1 = t1C + KELVIN_OFFSET;
  return (R * Math.log(q10) * t1 * (t1 + 10)) / 10 / 1000;
}
