import { scanMax } from './brent';
import { KELVIN_OFFSET, R } from './constants';
import { softplus } from './kinetics';

/** Catalysis law for an initial-rate optimum: Arrhenius (Ea) or Eyring-Polanyi (dG of activation), kJ/mol. */
export type CatalysisLaw = { eaKJPerMol: number } | { dGcatKJPerMol: number };

/** Temperature (degC, within boundsC) of the highest initial rate under the Equilibrium Model (no time-dependent loss). */
export function initialRateOptimumC(law: CatalysisLaw, equilibrium: { teqC: number; dHeqKJPerMol: number }, boundsC: [number, number]): number {
  const invTeq = 1 / (equilibrium.teqC + KELVIN_OFFSET);
  const dHR = (equilibrium.dHeqKJPerMol * 1000) / R;
  const lnCat = 'eaKJPerMol' in law ? (t: number) => -(law.eaKJPerMol * 1000) / (R * t) : (t: number) => Math.log(t) - (law.dGcatKJPerMol * 1000) / (R * t);
  const f = (c: number) => {
    const t = c + KELVIN_OFFSET;
    return lnCat(t) - softplus(dHR * (invTeq - 1 / t));
  };
  const [lo, hi] = boundsC;
  return scanMax(f, lo, hi, Math.min(801, Math.max(21, Math.ceil((hi - lo) / 0.5) + 1)), 1e-9).x;
}
