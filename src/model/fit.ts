import { KELVIN_OFFSET, R } from './constants';
import { ModelInputError } from './errors';
import { softplus } from './kinetics';
import { levenbergMarquardt } from './lm';
import { studentTQuantile } from './stats';

export interface InactivationPoint {
  /** Hold temperature, degC. */
  c: number;
  /** Time held, h. */
  h: number;
  /** Residual activity, fraction of the activity at h = 0. */
  residual: number;
}

export interface TwoStepEstimate {
  perTemperature: { c: number; kdPerH: number; se: number | null; n: number }[];
  /** Arrhenius-plot estimate; null when fewer than two temperatures decay. */
  kdRefPerH: number | null;
  edKJPerMol: number | null;
}

export interface InactivationFit {
  tRefC: number;
  kdRefPerH: number;
  edKJPerMol: number;
  halfLifeRefH: number;
  se: { kdRefPerH: number; edKJPerMol: number; halfLifeRefH: number };
  /** Covariance of [ln kdRefPerH, edKJPerMol] (kJ/mol units); feed it to the Monte Carlo. */
  covariance: number[][];
  twoStep: TwoStepEstimate;
  /** Standard deviation of ln(residual) about the fit. */
  residualSd: number;
  n: number;
  dof: number;
}

/** 'percent' when readings look like percentages (any value above 1.5), else 'fraction'. */
export function residualScale(values: number[]): 'fraction' | 'percent' {
  return values.some((v) => v > 1.5) ? 'percent' : 'fraction';
}

function xOf(c: number, tRefC: number): number {
  // (1/T - 1/Tref)/R times 1000, so that an energy in kJ/mol multiplies it.
  return (1000 * (1 / (c + KELVIN_OFFSET) - 1 / (tRefC + KELVIN_OFFSET))) / R;
}

/** Per-temperature kd (1/h) by least squares through the origin of ln residual vs time, then the Arrhenius plot. */
export function twoStepInactivation(tRefC: number, points: InactivationPoint[]): TwoStepEstimate {
  const groups = new Map<number, InactivationPoint[]>();
  for (const p of points) {
    const g = groups.get(p.c);
    if (g) g.push(p);
    else groups.set(p.c, [p]);
  }
  const perTemperature = [...groups.entries()]
    .sort((a, b) => a[0] - b[0])
    .map(([c, pts]) => {
      let stt = 0;
      let sty = 0;
      for (const p of pts) {
        stt += p.h * p.h;
        sty += p.h * Math.log(p.residual);
      }
      const kd = stt > 0 ? -sty / stt : 0;
      let ss = 0;
      for (const p of pts) {
        const e = Math.log(p.residual) + kd * p.h;
        ss += e * e;
      }
      const se = pts.length > 1 && stt > 0 ? Math.sqrt(ss / (pts.length - 1) / stt) : null;
      return { c, kdPerH: kd, se, n: pts.length };
    });
  const pos = perTemperature.filter((t) => t.kdPerH > 0);
  if (pos.length < 2) return { perTemperature, kdRefPerH: null, edKJPerMol: null };
  const xs = pos.map((t) => xOf(t.c, tRefC));
  const ys = pos.map((t) => Math.log(t.kdPerH));
  const mx = xs.reduce((a, b) => a + b, 0) / xs.length;
  const my = ys.reduce((a, b) => a + b, 0) / ys.length;
  let sxx = 0;
  let sxy = 0;
  for (let i = 0; i < xs.length; i++) {
    sxx += (xs[i] - mx) ** 2;
    sxy += (xs[i] - mx) * (ys[i] - my);
  }
  const slope = sxy / sxx;
  return { perTemperature, kdRefPerH: Math.exp(my - slope * mx), edKJPerMol: -slope };
}

/** Fit kdRefPerH (1/h) and edKJPerMol from residual activity at several temperatures: one-step NLS on ln residual, covariance s^2 (J^T J)^-1. */
export function fitInactivation(tRefC: number, points: InactivationPoint[]): InactivationFit {
  if (!Number.isFinite(tRefC)) throw new ModelInputError('tRefC', 'must be a finite number');
  if (!Array.isArray(points) || points.length < 3) throw new ModelInputError('points', 'needs at least three points');
  points.forEach((p, i) => {
    if (!Number.isFinite(p.c)) throw new ModelInputError(`points[${i}].c`, 'must be a finite number');
    if (!Number.isFinite(p.h) || p.h < 0) throw new ModelInputError(`points[${i}].h`, 'must be a finite number >= 0');
    if (!Number.isFinite(p.residual) || p.residual <= 0 || p.residual > 1.5)
      throw new ModelInputError(`points[${i}].residual`, 'must be > 0 and <= 1.5 (a fraction, not a percentage)');
  });
  const temps = new Set(points.map((p) => p.c));
  if (temps.size < 2) throw new ModelInputError('points', 'needs at least two temperatures');
  const twoStep = twoStepInactivation(tRefC, points);
  if (!twoStep.perTemperature.some((t) => t.kdPerH > 0)) throw new ModelInputError('points', 'shows no decay');

  const xs = points.map((p) => xOf(p.c, tRefC));
  const ys = points.map((p) => Math.log(p.residual));
  const ts = points.map((p) => p.h);
  const residuals = (th: number[]) =>
    ys.map((y, i) => y + Math.exp(th[0] - th[1] * xs[i]) * ts[i]);
  const jacobian = (th: number[]) =>
    xs.map((x, i) => {
      const kt = Math.exp(th[0] - th[1] * x) * ts[i];
      return [kt, -x * kt];
    });
  let start: number[];
  if (twoStep.kdRefPerH !== null && twoStep.edKJPerMol !== null && twoStep.edKJPerMol > 0)
    start = [Math.log(twoStep.kdRefPerH), twoStep.edKJPerMol];
  else {
    const pos = twoStep.perTemperature.filter((t) => t.kdPerH > 0);
    const mean = pos.reduce((s, t) => s + Math.log(t.kdPerH) + 200 * xOf(t.c, tRefC), 0) / pos.length;
    start = [mean, 200];
  }
  const lm = levenbergMarquardt(residuals, jacobian, start);
  const n = points.length;
  const dof = n - 2;
  if (!lm.jtjInverse || !lm.params.every(Number.isFinite)) throw new ModelInputError('points', 'gives a singular fit');
  const s2 = lm.ssr / dof;
  const cov = lm.jtjInverse.map((row) => row.map((v) => v * s2));
  const [lnKd, ed] = lm.params;
  const kd = Math.exp(lnKd);
  const seLn = Math.sqrt(cov[0][0]);
  if (!Number.isFinite(seLn) || !Number.isFinite(cov[1][1])) throw new ModelInputError('points', 'gives a singular fit');
  return {
    tRefC,
    kdRefPerH: kd,
    edKJPerMol: ed,
    halfLifeRefH: Math.LN2 / kd,
    se: { kdRefPerH: kd * seLn, edKJPerMol: Math.sqrt(cov[1][1]), halfLifeRefH: (Math.LN2 / kd) * seLn },
    covariance: cov,
    twoStep,
    residualSd: Math.sqrt(s2),
    n,
    dof,
  };
}

/** Half-life (h) at a temperature (degC) with a 95 % interval: delta method on ln t1/2, Student t with n - 2 dof. */
export function halfLifeAt(
  fit: Pick<InactivationFit, 'tRefC' | 'kdRefPerH' | 'edKJPerMol' | 'covariance' | 'dof'>,
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

export interface InitialRatePoint {
  /** Assay temperature, degC. */
  c: number;
  /** Initial rate, any positive unit (g/L/h for vmax). */
  rate: number;
}

export interface InitialRateFit {
  model: 'arrhenius' | 'equilibrium';
  eaKJPerMol: number;
  /** Rate at tRefC in the unit of the data (for the Equilibrium Model: before the active-fraction factor). */
  rateRef: number;
  se: { eaKJPerMol: number };
  equilibrium: { teqC: number; dHeqKJPerMol: number; se: { teqC: number; dHeqKJPerMol: number } } | null;
  n: number;
}

function ols(xs: number[], ys: number[]): { a: number; b: number; seB: number; ssr: number } {
  const n = xs.length;
  const mx = xs.reduce((s, v) => s + v, 0) / n;
  const my = ys.reduce((s, v) => s + v, 0) / n;
  let sxx = 0;
  let sxy = 0;
  for (let i = 0; i < n; i++) {
    sxx += (xs[i] - mx) ** 2;
    sxy += (xs[i] - mx) * (ys[i] - my);
  }
  const b = sxy / sxx;
  const a = my - b * mx;
  let ssr = 0;
  for (let i = 0; i < n; i++) ssr += (ys[i] - a - b * xs[i]) ** 2;
  const seB = n > 2 ? Math.sqrt(ssr / (n - 2) / sxx) : NaN;
  return { a, b, seB, ssr };
}

/** Ea (kJ/mol) from initial rates vs temperature; the Equilibrium Model too when rates fall past a peak on two or more points. */
export function fitInitialRates(points: InitialRatePoint[], tRefC: number): InitialRateFit {
  if (!Array.isArray(points) || points.length < 3) throw new ModelInputError('points', 'needs at least three points');
  points.forEach((p, i) => {
    if (!Number.isFinite(p.c)) throw new ModelInputError(`points[${i}].c`, 'must be a finite number');
    if (!Number.isFinite(p.rate) || p.rate <= 0) throw new ModelInputError(`points[${i}].rate`, 'must be a number > 0');
  });
  const sorted = [...points].sort((a, b) => a.c - b.c);
  if (new Set(sorted.map((p) => p.c)).size < 2) throw new ModelInputError('points', 'needs at least two temperatures');
  let iMax = 0;
  for (let i = 1; i < sorted.length; i++) if (sorted[i].rate > sorted[iMax].rate) iMax = i;
  const falling = sorted.length - 1 - iMax;
  const rising = sorted.slice(0, iMax + 1);
  const arm = falling >= 2 && rising.length >= 2 ? rising : sorted;
  const lin = ols(
    arm.map((p) => xOf(p.c, tRefC)),
    arm.map((p) => Math.log(p.rate)),
  );
  const arrhenius: InitialRateFit = {
    model: 'arrhenius',
    eaKJPerMol: -lin.b,
    rateRef: Math.exp(lin.a),
    se: { eaKJPerMol: lin.seB },
    equilibrium: null,
    n: arm.length,
  };
  if (falling < 2 || sorted.length < 5 || rising.length < 2) return arrhenius;

  const xs = sorted.map((p) => xOf(p.c, tRefC));
  const ys = sorted.map((p) => Math.log(p.rate));
  const invT = sorted.map((p) => 1 / (p.c + KELVIN_OFFSET));
  // Parameters: ln rateRef, Ea (kJ/mol), Teq (degC), dHeq (kJ/mol).
  const model = (th: number[], i: number) => {
    const lnKeq = ((th[3] * 1000) / R) * (1 / (th[2] + KELVIN_OFFSET) - invT[i]);
    return th[0] - th[1] * xs[i] - softplus(lnKeq);
  };
  const residuals = (th: number[]) => ys.map((y, i) => y - model(th, i));
  const jacobian = (th: number[]) =>
    ys.map((_, i) => {
      const invTeq = 1 / (th[2] + KELVIN_OFFSET);
      const lnKeq = ((th[3] * 1000) / R) * (invTeq - invT[i]);
      const frac = 1 / (1 + Math.exp(-lnKeq));
      // d residual = -d model; d softplus/d lnKeq = Keq/(1+Keq).
      return [
        -1,
        xs[i],
        frac * ((th[3] * 1000) / R) * -(invTeq * invTeq),
        frac * (1000 / R) * (invTeq - invT[i]),
      ];
    });
  const fallArm = sorted.slice(iMax);
  const fall = ols(
    fallArm.map((p) => xOf(p.c, tRefC)),
    fallArm.map((p) => Math.log(p.rate)),
  );
  const ea0 = Math.max(1, -lin.b);
  const dh0 = Math.max(ea0 * 1.5, ea0 + fall.b);
  const start = [lin.a, ea0, sorted[iMax].c, dh0];
  const lm = levenbergMarquardt(residuals, jacobian, start);
  const n = sorted.length;
  if (!lm.jtjInverse || n <= 4 || !lm.params.every(Number.isFinite) || lm.params[3] <= lm.params[1]) return arrhenius;
  const s2 = lm.ssr / (n - 4);
  const se = lm.jtjInverse.map((row, i) => Math.sqrt(row[i] * s2));
  return {
    model: 'equilibrium',
    eaKJPerMol: lm.params[1],
    rateRef: Math.exp(lm.params[0]),
    se: { eaKJPerMol: se[1] },
    equilibrium: { teqC: lm.params[2], dHeqKJPerMol: lm.params[3], se: { teqC: se[2], dHeqKJPerMol: se[3] } },
    n,
  };
}
