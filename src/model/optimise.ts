import { scanMax } from './brent';
import { KELVIN_OFFSET } from './constants';
import { ModelInputError } from './errors';
import { compileRates, lnKAt, lnVAt, type Rates } from './kinetics';
import { lambertWm1 } from './lambert-w';
import { advanceConstant, productFromWork, simulate } from './batch';
import type { EnzymeParams, Reading, Stage, Substrate } from './types';

// Local bindings of hot imports: CommonJS transforms (tsx, esbuild) route every call to an imported
// function through a getter, which blocks inlining in the inner loops.
const lnVFast = lnVAt;
const lnKFast = lnKAt;
const advance = advanceConstant;
const wm1 = lambertWm1;

export type BoundSide = 'lower' | 'upper' | null;

export interface SetpointOptimum {
  setpointC: number;
  productGPerL: number;
  residualActivity: number;
  atBound: BoundSide;
}

// 1 - u/(e^u - 1) and its derivative, with series where expm1 would cancel.
function gOfU(u: number): number {
  if (u < 0.05) {
    const u2 = u * u;
    return u / 2 - u2 / 12 + (u2 * u2) / 720 - (u2 * u2 * u2) / 30240;
  }
  return 1 - u / Math.expm1(u);
}

function dgOfU(u: number): number {
  if (u < 0.05) {
    const u2 = u * u;
    return 0.5 - u / 6 + (u2 * u) / 180 - (u2 * u2 * u) / 5040;
  }
  const em = Math.expm1(u);
  return (u * Math.exp(u) - em) / (em * em);
}

/** kd(T*) * batch at the isothermal optimum for Ea/Ed = eps in (0, 1): u/(e^u - 1) = 1 - eps via W-1, Newton-polished. */
export function isothermalOptimumU(eps: number): number {
  if (!(eps > 0)) return 0;
  if (!(eps < 1)) return Infinity;
  const c = 1 - eps;
  let u = eps < 0.01 ? 2 * eps : -c - wm1(-c * Math.exp(-c));
  if (!(u > 0) || !Number.isFinite(u)) u = 2 * eps;
  // W-1 is already near rounding; Newton on the defining equation is quadratic, so a step below 1e-9 of u
  // leaves an error far below rounding.
  for (let i = 0; i < 6; i++) {
    const step = (gOfU(u) - eps) / dgOfU(u);
    u -= step;
    if (!(u > 0)) u = 1e-300;
    if (Math.abs(step) <= 1e-9 * u) break;
  }
  return u;
}

/** ln of the work (g/L) done over batchH hours at one temperature, from fresh enzyme. */
export function lnWorkIsothermal(r: Rates, c: number, batchH: number): number {
  const invT = 1 / (c + KELVIN_OFFSET);
  const lnK = lnKFast(r, invT);
  const kt = Math.exp(lnK) * batchH;
  const lnPhi = kt > 1e-300 ? Math.log(-Math.expm1(-kt)) - lnK : Math.log(batchH);
  return lnVFast(r, invT) + lnPhi;
}

/** Work (g/L) done over batchH hours at one temperature, from fresh enzyme. */
export function workIsothermal(r: Rates, c: number, batchH: number): number {
  const invT = 1 / (c + KELVIN_OFFSET);
  const k = Math.exp(lnKFast(r, invT));
  const kt = k * batchH;
  return Math.exp(lnVFast(r, invT)) * (kt > 1e-300 ? -Math.expm1(-kt) / k : batchH);
}

function boundSide(x: number, lo: number, hi: number): BoundSide {
  if (x <= lo) return 'lower';
  if (x >= hi) return 'upper';
  return null;
}

/** Setpoint (degC) that maximises ln X, so product, over batchH hours within bounds (pure Arrhenius: closed form). */
export function optimalSetpointC(enzyme: EnzymeParams, batchH: number, boundsC: [number, number]): number {
  const [lo, hi] = boundsC;
  if (hi <= lo) return lo;
  if (enzyme.equilibrium) {
    const r = compileRates(enzyme);
    const n = Math.min(801, Math.max(41, Math.ceil((hi - lo) / 0.25) + 1));
    const best = scanMax((c) => lnWorkIsothermal(r, c, batchH), lo, hi, n, 1e-7);
    return best.x;
  }
  if (!(enzyme.kdRefPerH > 0) || enzyme.edKJPerMol <= enzyme.eaKJPerMol) return hi;
  if (!(enzyme.eaKJPerMol > 0)) return lo;
  const u = isothermalOptimumU(enzyme.eaKJPerMol / enzyme.edKJPerMol);
  const r = compileRates(enzyme);
  const invT = r.invTRef - Math.log(u / (batchH * enzyme.kdRefPerH)) / r.edR;
  const c = invT > 0 ? 1 / invT - KELVIN_OFFSET : Infinity;
  if (c <= lo) return lo;
  if (c >= hi) return hi;
  return c;
}

/** Best isothermal setpoint (degC) for a batch of batchH hours within boundsC, with its product (g/L). */
export function optimizeSetpoint(
  enzyme: EnzymeParams,
  substrate: Substrate,
  batchH: number,
  boundsC: [number, number],
): SetpointOptimum {
  const c = optimalSetpointC(enzyme, batchH, boundsC);
  const sim = simulate(enzyme, substrate, batchH, { setpointC: c });
  return {
    setpointC: c,
    productGPerL: sim.productGPerL,
    residualActivity: sim.residualActivity,
    atBound: boundSide(c, boundsC[0], boundsC[1]),
  };
}

export interface ProfileOptimum {
  stages: Stage[];
  productGPerL: number;
  residualActivity: number;
  isothermal: { setpointC: number; productGPerL: number };
  gainFraction: number;
}

interface StageTables {
  g: Float64Array;
  e: Float64Array;
}

function stageTables(r: Rates, grid: Float64Array, tau: number): StageTables {
  const g = new Float64Array(grid.length);
  const e = new Float64Array(grid.length);
  const st = { x: 0, a: 1, kint: 0 };
  for (let p = 0; p < grid.length; p++) {
    st.x = 0;
    st.a = 1;
    st.kint = 0;
    advance(r, 1 / (grid[p] + KELVIN_OFFSET), tau, st);
    g[p] = st.x;
    e[p] = st.a;
  }
  return { g, e };
}

// Exact dynamic programme on per-stage grids: work to go per unit activity V_i(T) = g(T) + e(T) max V_{i+1}(T')
// over |T' - T| <= step, because activity entering a stage scales everything after it.
function dpSolve(
  grids: Float64Array[],
  tables: StageTables[],
  step: number,
  firstLo: number,
  firstHi: number,
): { temps: number[]; work: number } {
  const n = grids.length;
  const values: Float64Array[] = new Array(n);
  const args: Int32Array[] = new Array(n);
  const tol = 1e-9;
  values[n - 1] = Float64Array.from(tables[n - 1].g);
  args[n - 1] = new Int32Array(grids[n - 1].length).fill(-1);
  for (let i = n - 2; i >= 0; i--) {
    const g = grids[i];
    const gn = grids[i + 1];
    const vn = values[i + 1];
    const { g: gi, e: ei } = tables[i];
    const vi = new Float64Array(g.length);
    const ai = new Int32Array(g.length);
    const dq = new Int32Array(gn.length);
    let head = 0;
    let tail = 0;
    let right = 0;
    for (let p = 0; p < g.length; p++) {
      const t = g[p];
      while (right < gn.length && gn[right] <= t + step + tol) {
        while (tail > head && vn[dq[tail - 1]] <= vn[right]) tail--;
        dq[tail++] = right;
        right++;
      }
      while (tail > head && gn[dq[head]] < t - step - tol) head++;
      if (tail === head || vn[dq[head]] === -Infinity) {
        vi[p] = -Infinity;
        ai[p] = -1;
      } else {
        vi[p] = gi[p] + ei[p] * vn[dq[head]];
        ai[p] = dq[head];
      }
    }
    values[i] = vi;
    args[i] = ai;
  }
  let best = -1;
  let bestV = -Infinity;
  const g0 = grids[0];
  for (let p = 0; p < g0.length; p++) {
    if (g0[p] < firstLo - tol || g0[p] > firstHi + tol) continue;
    if (values[0][p] > bestV) {
      bestV = values[0][p];
      best = p;
    }
  }
  const temps: number[] = [];
  let p = best;
  for (let i = 0; i < n; i++) {
    temps.push(grids[i][p]);
    p = args[i][p];
  }
  return { temps, work: bestV };
}

function sortedGrid(values: number[]): Float64Array {
  const a = Float64Array.from(values);
  a.sort();
  return a;
}

/** Best profile of `stages` equal stages within boundsC (degC), neighbours at most maxStepC apart (and from startC); never below the best isothermal setpoint. */
export function optimizeProfile(
  enzyme: EnzymeParams,
  substrate: Substrate,
  batchH: number,
  boundsC: [number, number],
  stages: number,
  maxStepC: number,
  startC?: number,
): ProfileOptimum {
  const [lo, hi] = boundsC;
  const n = Math.max(1, Math.floor(stages));
  const tau = batchH / n;
  const step = Math.max(0, maxStepC);
  const r = compileRates(enzyme);
  const iso = optimizeSetpoint(enzyme, substrate, batchH, boundsC);
  let firstLo = lo;
  let firstHi = hi;
  if (startC !== undefined) {
    firstLo = Math.max(lo, startC - step);
    firstHi = Math.min(hi, startC + step);
    if (firstLo > firstHi) throw new ModelInputError('startC', 'must be within maxStepC of boundsC');
  }
  const isoFeasible = iso.setpointC >= firstLo - 1e-9 && iso.setpointC <= firstHi + 1e-9;

  const span = hi - lo;
  let h = span > 0 ? Math.max(span / 20000, Math.min(span / 1600, step > 0 ? step / 8 : span / 1600)) : 1;
  const base: number[] = [];
  const m0 = span > 0 ? Math.round(span / h) : 0;
  for (let i = 0; i <= m0; i++) base.push(i === m0 ? hi : lo + (i * span) / m0);
  base.push(iso.setpointC);
  if (startC !== undefined) base.push(firstLo, firstHi);
  const grid0 = sortedGrid(base.filter((c) => c >= lo && c <= hi));
  const tab0 = stageTables(r, grid0, tau);
  let sol = dpSolve(new Array(n).fill(grid0), new Array(n).fill(tab0), step, firstLo, firstHi);
  h = span > 0 ? span / Math.max(m0, 1) : 0;
  for (let level = 0; level < 4 && h > 0; level++) {
    const width = 2 * h;
    const grids: Float64Array[] = [];
    const tables: StageTables[] = [];
    for (let i = 0; i < n; i++) {
      const centre = sol.temps[i];
      const pts: number[] = [];
      for (let j = 0; j <= 40; j++) {
        const c = j === 20 ? centre : centre + width * (j / 20 - 1);
        if (c >= lo && c <= hi) pts.push(c);
      }
      if (i === 0 && startC !== undefined) pts.push(Math.max(firstLo, Math.min(firstHi, centre)));
      const gi = sortedGrid(pts);
      grids.push(gi);
      tables.push(stageTables(r, gi, tau));
    }
    const next = dpSolve(grids, tables, step, firstLo, firstHi);
    if (next.work >= sol.work) sol = next;
    h /= 10;
  }

  let out = sol.temps.map((c) => ({ hours: tau, c }));
  let sim = simulate(enzyme, substrate, batchH, { stages: out });
  if (isoFeasible && sim.productGPerL < iso.productGPerL) {
    out = out.map(() => ({ hours: tau, c: iso.setpointC }));
    sim = simulate(enzyme, substrate, batchH, { stages: out });
  }
  return {
    stages: out,
    productGPerL: sim.productGPerL,
    residualActivity: sim.residualActivity,
    isothermal: { setpointC: iso.setpointC, productGPerL: iso.productGPerL },
    gainFraction: iso.productGPerL > 0 ? sim.productGPerL / iso.productGPerL - 1 : 0,
  };
}

/** Turn planned stages into a temperature log (h, degC) that includes the vessel's heating and cooling limits (degC/h). */
export function stagesWithRamps(stages: readonly Stage[], startC: number, maxHeatCPerH: number, maxCoolCPerH: number): Reading[] {
  const log: Reading[] = [{ h: 0, c: startC }];
  let t = 0;
  let cur = startC;
  for (const s of stages) {
    const end = t + s.hours;
    if (s.c !== cur) {
      const rate = s.c > cur ? maxHeatCPerH : maxCoolCPerH;
      const rampH = Math.abs(s.c - cur) / rate;
      if (rampH < s.hours) {
        cur = s.c;
        log.push({ h: t + rampH, c: cur });
      } else {
        cur += Math.sign(s.c - cur) * rate * s.hours;
      }
    }
    log.push({ h: end, c: cur });
    t = end;
  }
  return log;
}

/** Work (g/L) for a stage list, from fresh enzyme: the objective the profile search maximises. */
export function workOfStages(enzyme: EnzymeParams, stages: readonly Stage[]): number {
  const r = compileRates(enzyme);
  const st = { x: 0, a: 1, kint: 0 };
  for (const s of stages) advance(r, 1 / (s.c + KELVIN_OFFSET), s.hours, st);
  return st.x;
}

/** Product (g/L) from work (g/L) for a substrate: re-exported for callers that hold X. */
export function productForWork(substrate: Substrate, workGPerL: number): number {
  return productFromWork(workGPerL, substrate.s0GPerL, substrate.kmGPerL);
}
