// A fitted lot's half-life at a temperature with its interval: small, and needed where the fit itself is not
// (the planner in the browser reads a stored fit), so it lives apart from the fitting code.
import { KELVIN_OFFSET, R } from './constants';
import { studentTQuantile } from './stats';

/** (1/T - 1/Tref)/R times 1000, so that an energy in kJ/mol multiplies it. */
export function xOf(c: number, tRefC: number): number {
  return (1000 * (1 / (c + KELVIN_OFFSET) - 1 / (tRefC + KELVIN_OFFSET))) / R;
}

/** Half-life (h) at a temperature (degC) with a 95 % interval: delta method on ln t1/2, Student t with n - 2 dof. */
export function halfLifeAt(
  fit: { tRefC: number; kdRefPerH: number; edKJPerMol: number; covariance: number[][]; dof: number },
  c: number,
  level = 0.95,
): { c: number; kdPerH: number; halfLifeH: number; lowerH: number; upperH: number } {
  const x = xOf(c, fit.tRefC);
  const lnKd = Math.log(fit.kdRefPerH) - fit.edKJPerMol * x;
  const lnHalf = Math.log(Math.LN2) - lnKd;
  const cv = fit.covariance;
  // d ln t1/2 / d(ln kdRef, Ed) = (-1, x).
  const varLn = cv[0][0] - 2 * x * cv[0][1] + x * x * cv[1][1];
  const q = studentTQuantile(0.5 + level / 2, Math.max(1, fit.dof));
  const sd = Math.sqrt(Math.max(0, varLn));
  return {
    c,
    kdPerH: Math.exp(lnKd),
    halfLifeH: Math.exp(lnHalf),
    lowerH: Math.exp(lnHalf - q * sd),
    upperH: Math.exp(lnHalf + q * sd),
  };
}
