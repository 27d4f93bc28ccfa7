import { KELVIN_OFFSET } from './constants';
import type { TemperatureInput } from './types';

// IAPWS-IF97 region 4 (saturation line) coefficients n1..n10.
const N = [
  0.11670521452767e4, -0.72421316703206e6, -0.17073846940092e2, 0.1202082470247e5, -0.32325550322333e7, 0.1491510861353e2, -0.48232657361591e4,
  0.40511340542057e6, -0.23855557567849, 0.65017534844798e3,
];

/** Saturation pressure of water in kPa absolute at a temperature in degC (IAPWS-IF97 region 4, 0.01 to 373.946 degC). */
export function waterSaturationPressureKPa(c: number): number {
  const t = c + KELVIN_OFFSET;
  const th = t + N[8] / (t - N[9]);
  const a = th * th + N[0] * th + N[1];
  const b = N[2] * th * th + N[3] * th + N[4];
  const cc = N[5] * th * th + N[6] * th + N[7];
  const p = Math.pow((2 * cc) / (-b + Math.sqrt(b * b - 4 * a * cc)), 4);
  return p * 1000;
}

/** Highest temperature (degC) a program reaches; with crossesBoiling when a water-based batch above 100 degC is pressurised. */
export function pressureCaution(temp: TemperatureInput): { maxC: number; crossesBoiling: boolean; saturationKPa: number } {
  let maxC = -Infinity;
  if ('setpointC' in temp) maxC = temp.setpointC;
  else if ('stages' in temp) for (const s of temp.stages) maxC = Math.max(maxC, s.c);
  else for (const r of temp.log) maxC = Math.max(maxC, r.c);
  return { maxC, crossesBoiling: maxC > 100, saturationKPa: waterSaturationPressureKPa(maxC) };
}
