import { scanMax } from './brent';
import { KELVIN_OFFSET } from './constants';
import { ModelInputError } from './errors';
import { compileRates, lnK2At, lnKAt, lnVAt, type Rates } from './kinetics';
import { lambertWm1 } from './lambert-w';
import { advanceConstant, simulate, startState } from './batch';
import type { EnzymeParams, Reading, Stage, Substrate } from './types';

// Local bindings of hot imports: CommonJS transforms (tsx, esbuild) route every call to an imported
// function through a getter, which blocks inlining in the inner loops.
const lnVFast = lnVAt;
const lnKFast = lnKAt;
const lnK2Fast = lnK2At;
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

/** ln of the work (g/L) done over batchH hours at one temperature, from fresh enzyme (both fractions). */
export function lnWorkIsothermal(r: Rates, c: number, batchH: number): number {
  const invT = 1 / (c + KELVIN_OFFSET);
  const lnK = lnKFast(r, invT);
  const kt = Math.exp(lnK) * batchH;
  let lnPhi = kt > 1e-300 ? Math.log(-Math.expm1(-kt)) - lnK : Math.log(batchH);
  if (r.share > 0) {
    const k2 = Math.exp(lnK2Fast(r, invT));
    const k2t = k2 * batchH;
    lnPhi = Math.log((1 - r.share) * Math.exp(lnPhi) + r.share * (k2t > 1e-300 ? -Math.expm1(-k2t) / k2 : batchH));
  }
  return lnVFast(r, invT) + lnPhi;
}

/** Work (g/L) done over batchH hours at one temperature, from fresh enzyme (both fractions). */
export function workIsothermal(r: Rates, c: number, batchH: number): number {
  if (r.share > 0) return Math.exp(lnWorkIsothermal(r, c, batchH));
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
  if (enzyme.stableFraction && !enzyme.equilibrium) {
    // Two fractions, pure Arrhenius: X = (1 - s) X1 + s X2 with each fraction's work unimodal in T (ln X_j is
    // concave in -1/T) and its own optimum in closed form, so X rises below both optima and falls above both:
    // every maximum lies between them. ln X can have two local maxima there, so scan that interval (0.25 degC)
    // and bracket the best.
    const { stableFraction: sf, ...labile } = enzyme;
    const c1 = optimalSetpointC(labile, batchH, boundsC);
    const c2 = optimalSetpointC({ ...labile, kdRefPerH: sf.kdRefPerH, edKJPerMol: sf.edKJPerMol }, batchH, boundsC);
    const a = Math.min(c1, c2);
    const b = Math.max(c1, c2);
    if (!(b > a)) return a;
    const r = compileRates(enzyme);
    const n = Math.min(801, Math.max(9, Math.ceil((b - a) / 0.25) + 1));
    return scanMax((c) => lnWorkIsothermal(r, c, batchH), a, b, n, 1e-7).x;
  }
  if (enzyme.equilibrium || enzyme.stableFraction) {
    // No closed form: scan the bounds (0.25 degC) first and bracket the best.
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
export function optimizeSetpoint(enzyme: EnzymeParams, substrate: Substrate, batchH: number, boundsC: [number, number]): SetpointOptimum {
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
  /** Two fractions only: the best program's work is at most this fraction above the result's (a certified bound). */
  optimalityGapBound?: number;
}

/** Per-stage tables on a grid: work g and activity factor e of a unit of labile activity; g2, e2 of a unit of stable activity. */
interface StageTables {
  g: Float64Array;
  e: Float64Array;
  g2: Float64Array;
  e2: Float64Array;
}

function stageTables(r: Rates, grid: Float64Array, tau: number): StageTables {
  const m = grid.length;
  const t: StageTables = { g: new Float64Array(m), e: new Float64Array(m), g2: new Float64Array(m), e2: new Float64Array(m) };
  const st = { x: 0, a: 1, b: 0, kint: 0 };
  for (let p = 0; p < m; p++) {
    const invT = 1 / (grid[p] + KELVIN_OFFSET);
    st.x = 0;
    st.a = 1;
    st.b = 0;
    advance(r, invT, tau, st);
    t.g[p] = st.x;
    t.e[p] = st.a;
    if (r.share > 0) {
      st.x = 0;
      st.a = 0;
      st.b = 1;
      advance(r, invT, tau, st);
      t.g2[p] = st.x;
      t.e2[p] = st.b;
    }
  }
  return t;
}

type Fraction = 'labile' | 'stable' | 'mix';

// Dynamic programme on per-stage grids, neighbours at most `step` apart. One fraction: work to go per unit
// activity V_i(T) = g(T) + e(T) max V_{i+1}(T'), exact on the grids, because activity entering a stage scales
// everything after it. Two fractions ('mix'): work to go is (1 - rho) W1 + rho W2 with rho the stable share
// of the activity entering the stage; rho is frozen at the values along the current path (rhoIn), so the
// choice is exact on that path and first-order elsewhere; the caller re-evaluates every path exactly.
function dpSolve(
  grids: Float64Array[],
  tables: StageTables[],
  step: number,
  firstLo: number,
  firstHi: number,
  fraction: Fraction,
  rhoIn: Float64Array | null,
): { temps: number[]; work: number } {
  const n = grids.length;
  const w1: Float64Array[] = new Array(n);
  const w2: Float64Array[] = new Array(n);
  const val: Float64Array[] = new Array(n);
  const args: Int32Array[] = new Array(n);
  const tol = 1e-9;
  const mix = fraction === 'mix';
  const pick = (t: StageTables) => (fraction === 'stable' ? { g: t.g2, e: t.e2 } : { g: t.g, e: t.e });
  const combine = (i: number, a: Float64Array, b: Float64Array) => {
    if (!mix) return a;
    const rho = rhoIn ? rhoIn[i] : 0;
    const out = new Float64Array(a.length);
    for (let p = 0; p < a.length; p++) out[p] = (1 - rho) * a[p] + rho * b[p];
    return out;
  };
  const last = pick(tables[n - 1]);
  w1[n - 1] = Float64Array.from(last.g);
  w2[n - 1] = mix ? Float64Array.from(tables[n - 1].g2) : w1[n - 1];
  val[n - 1] = combine(n - 1, w1[n - 1], w2[n - 1]);
  args[n - 1] = new Int32Array(grids[n - 1].length).fill(-1);
  for (let i = n - 2; i >= 0; i--) {
    const g = grids[i];
    const gn = grids[i + 1];
    const vn = val[i + 1];
    const { g: gi, e: ei } = pick(tables[i]);
    const a1 = new Float64Array(g.length);
    const a2 = mix ? new Float64Array(g.length) : a1;
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
        a1[p] = -Infinity;
        if (mix) a2[p] = -Infinity;
        ai[p] = -1;
      } else {
        const j = dq[head];
        a1[p] = gi[p] + ei[p] * w1[i + 1][j];
        if (mix) a2[p] = tables[i].g2[p] + tables[i].e2[p] * w2[i + 1][j];
        ai[p] = j;
      }
    }
    w1[i] = a1;
    w2[i] = a2;
    val[i] = combine(i, a1, a2);
    args[i] = ai;
  }
  let best = -1;
  let bestV = -Infinity;
  const g0 = grids[0];
  for (let p = 0; p < g0.length; p++) {
    if (g0[p] < firstLo - tol || g0[p] > firstHi + tol) continue;
    if (val[0][p] > bestV) {
      bestV = val[0][p];
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
  // Drop exact duplicates so the window maximum sees each temperature once.
  let m = 0;
  for (let i = 0; i < a.length; i++) if (i === 0 || a[i] !== a[m - 1]) a[m++] = a[i];
  return a.slice(0, m);
}

// Work (g/L) of equal stages from fresh enzyme, and the stable share of the activity entering each stage.
function pathWork(r: Rates, temps: readonly number[], tau: number, rho?: Float64Array): number {
  const st = { x: 0, a: 1 - r.share, b: r.share, kint: 0 };
  for (let i = 0; i < temps.length; i++) {
    if (rho) rho[i] = st.a + st.b > 0 ? st.b / (st.a + st.b) : 0;
    advance(r, 1 / (temps[i] + KELVIN_OFFSET), tau, st);
  }
  return st.x;
}

/**
 * Lattice points origin + k h and hi - k h inside [max(lo, centre - hw), min(hi, centre + hw)], with the bounds:
 * the step is a whole number of cells, so ramps of exactly maxStepC a stage (from startC or from a bound) lie
 * on every grid and the step limit is never quantised below itself.
 */
function latticePoints(origin: number, h: number, lo: number, hi: number, centre: number, hw: number): number[] {
  const a = Math.max(lo, centre - hw);
  const b = Math.min(hi, centre + hw);
  const pts: number[] = [];
  for (let k = Math.ceil((a - origin) / h - 1e-9); origin + k * h <= b + 1e-12; k++) pts.push(origin + k * h);
  for (let k = Math.ceil((hi - b) / h - 1e-9); hi - k * h >= a - 1e-12; k++) pts.push(hi - k * h);
  if (lo >= a && lo <= b) pts.push(lo);
  if (hi >= a && hi <= b) pts.push(hi);
  return pts.filter((c) => c >= lo && c <= hi);
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
  const two = r.share > 0;
  const iso = optimizeSetpoint(enzyme, substrate, batchH, boundsC);
  let firstLo = lo;
  let firstHi = hi;
  if (startC !== undefined) {
    firstLo = Math.max(lo, startC - step);
    firstHi = Math.min(hi, startC + step);
    if (firstLo > firstHi) throw new ModelInputError('startC', 'must be within maxStepC of boundsC');
  }
  const isoFeasible = iso.setpointC >= firstLo - 1e-9 && iso.setpointC <= firstHi + 1e-9;
  const finish = (temps: number[], gapBound?: number): ProfileOptimum => {
    const out = temps.map((c) => ({ hours: tau, c }));
    const sim = simulate(enzyme, substrate, batchH, { stages: out });
    const res: ProfileOptimum = {
      stages: out,
      productGPerL: sim.productGPerL,
      residualActivity: sim.residualActivity,
      isothermal: { setpointC: iso.setpointC, productGPerL: iso.productGPerL },
      gainFraction: iso.productGPerL > 0 ? sim.productGPerL / iso.productGPerL - 1 : 0,
    };
    if (gapBound !== undefined) res.optimalityGapBound = gapBound;
    return res;
  };
  const span = hi - lo;
  if (step === 0 || !(span > 0)) {
    // Every stage at one temperature: the best setpoint the first stage may take.
    const c = optimalSetpointC(enzyme, batchH, [firstLo, firstHi]);
    return finish(new Array(n).fill(c), two ? 0 : undefined);
  }

  const origin = startC ?? lo;
  const target = Math.max(span / 20000, Math.min(span / 1600, step / 8));
  // A step limit finer than the finest grid cell (span / 20000) cannot be put on the lattice without an unbounded
  // grid: the grid stays at that cell, where the limit only allows holding a temperature (never below isothermal).
  const h0 = step < span ? (step < target / 2 ? target : step / Math.max(1, Math.round(step / target))) : span / 1600;
  const base = latticePoints(origin, h0, lo, hi, 0.5 * (lo + hi), span);
  base.push(iso.setpointC);
  if (startC !== undefined) base.push(firstLo, firstHi);
  const grid0 = sortedGrid(base.filter((c) => c >= lo && c <= hi));
  const tab0 = stageTables(r, grid0, tau);
  const rho = new Float64Array(n);

  const solve = (fraction: Fraction) => {
    const rounds = fraction === 'mix' ? 4 : 1;
    const score = (temps: number[], work: number) => (fraction === 'mix' ? pathWork(r, temps, tau) : work);
    let grids: Float64Array[] = new Array(n).fill(grid0);
    let tables: StageTables[] = new Array(n).fill(tab0);
    let sol: { temps: number[]; work: number } | null = null;
    let h = h0;
    for (let level = 0; level <= 4; level++) {
      if (level > 0) {
        h /= 10;
        grids = [];
        tables = [];
        for (let i = 0; i < n; i++) {
          const centre = sol!.temps[i];
          const pts = latticePoints(origin, h, lo, hi, centre, 20 * h);
          pts.push(centre);
          if (i === 0 && startC !== undefined) pts.push(Math.max(firstLo, Math.min(firstHi, centre)));
          const gi = sortedGrid(pts);
          grids.push(gi);
          tables.push(stageTables(r, gi, tau));
        }
      }
      for (let round = 0; round < rounds; round++) {
        if (fraction === 'mix') {
          if (sol) pathWork(r, sol.temps, tau, rho);
          else rho.fill(r.share);
        }
        const next = dpSolve(grids, tables, step, firstLo, firstHi, fraction, fraction === 'mix' ? rho : null);
        const v = score(next.temps, next.work);
        if (!sol || v > sol.work) sol = { temps: next.temps, work: v };
        else if (level > 0 || round > 0) break;
      }
    }
    return sol!;
  };

  const candidates: number[][] = [];
  let gapBound: number | undefined;
  if (!two) candidates.push(solve('labile').temps);
  else {
    const mix = solve('mix');
    const labile = solve('labile');
    const stable = solve('stable');
    candidates.push(mix.temps, labile.temps, stable.temps);
    // (1 - s) max W1 + s max W2 bounds the work of every program from above.
    const upper = (1 - r.share) * labile.work + r.share * stable.work;
    const bestWork = Math.max(...candidates.map((t) => pathWork(r, t, tau)), isoFeasible ? pathWork(r, new Array(n).fill(iso.setpointC), tau) : 0);
    gapBound = Math.max(0, upper / bestWork - 1);
  }
  if (isoFeasible) candidates.push(new Array(n).fill(iso.setpointC));
  let best = candidates[0];
  let bestW = pathWork(r, best, tau);
  for (const c of candidates.slice(1)) {
    const w = pathWork(r, c, tau);
    if (w > bestW) {
      best = c;
      bestW = w;
    }
  }
  return finish(best, gapBound);
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
  const st = startState(r);
  for (const s of stages) advance(r, 1 / (s.c + KELVIN_OFFSET), s.hours, st);
  return st.x;
}
