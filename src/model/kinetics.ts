import { KELVIN_OFFSET, R, BOLTZMANN, PLANCK } from './constants';
import type { EnzymeParams } from './types';

/** Precomputed constants of one enzyme, in kelvin and J/mol, for the hot loops. */
export interface Rates {
  lnVRef: number;
  /** Ea / R, K. */
  eaR: number;
  lnKdRef: number;
  /** Ed / R, K. */
  edR: number;
  invTRef: number;
  hasEq: boolean;
  /** dHeq / R, K. */
  dHeqR: number;
  invTeq: number;
  /** Two fractions: share of the stable fraction (0 when one fraction), its ln kd at TRef and Ed / R (K). */
  share: number;
  lnKd2Ref: number;
  ed2R: number;
}

/** Compile enzyme parameters (API units) into kelvin / J/mol constants. */
export function compileRates(e: EnzymeParams): Rates {
  const eq = e.equilibrium;
  const sf = e.stableFraction;
  return {
    lnVRef: Math.log(e.vmaxRef),
    eaR: (e.eaKJPerMol * 1000) / R,
    lnKdRef: e.kdRefPerH > 0 ? Math.log(e.kdRefPerH) : -Infinity,
    edR: (e.edKJPerMol * 1000) / R,
    invTRef: 1 / (e.tRefC + KELVIN_OFFSET),
    hasEq: eq !== undefined,
    dHeqR: eq ? (eq.dHeqKJPerMol * 1000) / R : 0,
    invTeq: eq ? 1 / (eq.teqC + KELVIN_OFFSET) : 0,
    share: sf ? sf.share : 0,
    lnKd2Ref: sf && sf.kdRefPerH > 0 ? Math.log(sf.kdRefPerH) : -Infinity,
    ed2R: sf ? (sf.edKJPerMol * 1000) / R : 0,
  };
}

/**
 * Rates are capped at e^600 (1/h or g/L/h): far past anything physical (an enzyme gone in 1e-260 h), and
 * it keeps sums and products of rates finite where an extreme Arrhenius factor would overflow.
 */
export const LN_RATE_CAP = 600;

/** ln(1 + e^x) without overflow. */
export function softplus(x: number): number {
  return x > 0 ? x + Math.log1p(Math.exp(-x)) : Math.log1p(Math.exp(x));
}

/** ln of the effective Vmax (g/L/h) at 1/T (1/K): Arrhenius, times the active fraction under the Equilibrium Model. */
export function lnVAt(r: Rates, invT: number): number {
  const lnV = Math.min(LN_RATE_CAP, r.lnVRef - r.eaR * (invT - r.invTRef));
  if (!r.hasEq) return lnV;
  return lnV - softplus(r.dHeqR * (r.invTeq - invT));
}

/** ln of the effective inactivation constant (1/h) at 1/T (1/K); only the inactive fraction is lost under the Equilibrium Model. */
export function lnKAt(r: Rates, invT: number): number {
  const lnK = Math.min(LN_RATE_CAP, r.lnKdRef - r.edR * (invT - r.invTRef));
  if (!r.hasEq) return lnK;
  return lnK - softplus(-r.dHeqR * (r.invTeq - invT));
}

/** ln of the stable fraction's inactivation constant (1/h) at 1/T (1/K). */
export function lnK2At(r: Rates, invT: number): number {
  return Math.min(LN_RATE_CAP, r.lnKd2Ref - r.ed2R * (invT - r.invTRef));
}

/** Largest |d ln v/dT| and |d ln k/dT| times T^2, K: bounds how fast rates can change along a ramp. */
export function slopeBoundK(r: Rates): number {
  return Math.max(r.eaR, r.edR, r.ed2R) + Math.abs(r.dHeqR);
}

/** Observed first-order loss rate (1/h) at tRefC: under the Equilibrium Model kdRefPerH times the inactive share Keq/(1+Keq). */
export function observedKdRefPerH(e: EnzymeParams): number {
  return kdAt(e, e.tRefC);
}

/** Effective Vmax at a temperature, g/L/h. */
export function vmaxAt(e: EnzymeParams, c: number): number {
  return Math.exp(lnVAt(compileRates(e), 1 / (c + KELVIN_OFFSET)));
}

/** Effective first-order inactivation constant at a temperature, 1/h. */
export function kdAt(e: EnzymeParams, c: number): number {
  return Math.exp(lnKAt(compileRates(e), 1 / (c + KELVIN_OFFSET)));
}

/** Arrhenius factor k(T)/k(Tref) for an activation energy in kJ/mol (dimensionless). */
export function arrheniusFactor(eaKJPerMol: number, c: number, refC: number): number {
  return Math.exp(-((eaKJPerMol * 1000) / R) * (1 / (c + KELVIN_OFFSET) - 1 / (refC + KELVIN_OFFSET)));
}

/** Active fraction 1/(1+Keq) of the Equilibrium Model at a temperature (dimensionless). */
export function activeFraction(eq: { teqC: number; dHeqKJPerMol: number }, c: number): number {
  const lnKeq = ((eq.dHeqKJPerMol * 1000) / R) * (1 / (eq.teqC + KELVIN_OFFSET) - 1 / (c + KELVIN_OFFSET));
  return Math.exp(-softplus(lnKeq));
}

/** Eyring-Polanyi rate constant (kB T / h) exp(-dG/(R T)), 1/s, for dG in kJ/mol. */
export function eyringRatePerS(dGKJPerMol: number, c: number): number {
  const t = c + KELVIN_OFFSET;
  return ((BOLTZMANN * t) / PLANCK) * Math.exp(-(dGKJPerMol * 1000) / (R * t));
}

/** Two-fraction decay f1 exp(-k1 t) + f2 exp(-k2 t) (fraction); rates and time in any consistent units. */
export function twoFractionResidual(f1: number, k1: number, f2: number, k2: number, t: number): number {
  return f1 * Math.exp(-k1 * t) + f2 * Math.exp(-k2 * t);
}

/** First-order residual activity exp(-kd t) (fraction); kd in 1/h, t in h. */
export function firstOrderResidual(kdPerH: number, h: number): number {
  return Math.exp(-kdPerH * h);
}
