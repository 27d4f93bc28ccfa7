// Independent reference for the engine: the raw ODE written out from the textbook laws and integrated by
// general-purpose libraries (odex: Gragg-Bulirsch-Stoer; mathjs solveODE: Runge-Kutta 4(5)).
import { Solver } from 'odex';
import type { EnzymeParams, Substrate, TemperatureInput } from '../../src/model';

const KELVIN = 273.15;
const GAS = 8.314462618; // J/(mol K), science.md

export function rawRates(e: EnzymeParams, c: number): { v: number; k: number } {
  const t = c + KELVIN;
  const tRef = e.tRefC + KELVIN;
  let v = e.vmaxRef * Math.exp(-((e.eaKJPerMol * 1000) / GAS) * (1 / t - 1 / tRef));
  let k = e.kdRefPerH * Math.exp(-((e.edKJPerMol * 1000) / GAS) * (1 / t - 1 / tRef));
  if (e.equilibrium) {
    const keq = Math.exp(((e.equilibrium.dHeqKJPerMol * 1000) / GAS) * (1 / (e.equilibrium.teqC + KELVIN) - 1 / t));
    v = v / (1 + keq);
    k = (k * keq) / (1 + keq);
  }
  return { v, k };
}

/** Temperature program as (knots, T(t)) so that integrators restart at every corner. */
export function program(temp: TemperatureInput, batchH: number): { knots: number[]; at: (h: number) => number } {
  if ('setpointC' in temp) return { knots: [batchH], at: () => temp.setpointC };
  if ('stages' in temp) {
    const ends: number[] = [];
    let t = 0;
    for (const s of temp.stages) {
      t += s.hours;
      ends.push(t);
    }
    const at = (h: number) => {
      for (let i = 0; i < ends.length; i++) if (h < ends[i]) return temp.stages[i].c;
      return temp.stages[temp.stages.length - 1].c;
    };
    return { knots: [...ends.filter((e) => e < batchH), batchH], at };
  }
  const log = temp.log;
  const at = (h: number) => {
    if (h <= log[0].h) return log[0].c;
    for (let i = 1; i < log.length; i++)
      if (h <= log[i].h && log[i].h > log[i - 1].h) return log[i - 1].c + ((log[i].c - log[i - 1].c) * (h - log[i - 1].h)) / (log[i].h - log[i - 1].h);
    return log[log.length - 1].c;
  };
  return { knots: [...log.map((r) => r.h).filter((h) => h > 0 && h < batchH), batchH], at };
}

/** Rate law written out from the textbook: v = V a S / (Km (1 + P/Ki) + S + S^2/Ksi), P = S0 - S (science.md). */
function rawRate(s: Substrate, v: number, a: number, p: number): number {
  const sLeft = s.s0GPerL - p;
  const km = s.kmGPerL * (1 + (s.kiGPerL ? p / s.kiGPerL : 0));
  return (v * a * sLeft) / (km + sLeft + (s.ksiGPerL ? (sLeft * sLeft) / s.ksiGPerL : 0));
}

/** The stable fraction's own Arrhenius kd at c (1/h). */
function stableKd(e: EnzymeParams, c: number): number {
  const f = e.stableFraction!;
  return f.kdRefPerH * Math.exp(-((f.edKJPerMol * 1000) / GAS) * (1 / (c + KELVIN) - 1 / (e.tRefC + KELVIN)));
}

/**
 * Product (g/L) and activity from odex on the raw ODE: dP/dt = rate(V, a1 + a2, P), da1/dt = -kd a1,
 * da2/dt = -kd2 a2 (a2 = 0 with one fraction), restarting at each knot.
 */
export function odexReference(e: EnzymeParams, s: Substrate, batchH: number, temp: TemperatureInput): { product: number; activity: number } {
  const midpoint = !('log' in temp);
  const solver = new Solver(3);
  solver.relativeTolerance = 1e-13;
  solver.absoluteTolerance = 1e-300;
  solver.maxSteps = 1e6;
  const { knots, at } = program(temp, batchH);
  const share = e.stableFraction?.share ?? 0;
  const rhs = (c: number, y: number[]) => {
    const { v, k } = rawRates(e, c);
    const k2 = share > 0 ? stableKd(e, c) : 0;
    return [rawRate(s, v, y[1] + y[2], y[0]), -k * y[1], -k2 * y[2]];
  };
  let y = [0, 1 - share, share];
  let t = 0;
  for (const kt of knots) {
    if (kt <= t) continue;
    const a = t;
    // For stages the piece's midpoint decides its temperature, so a step never samples the next stage.
    const g = midpoint ? (_h: number, yy: number[]) => rhs(at(0.5 * (a + kt)), yy) : (h: number, yy: number[]) => rhs(at(h), yy);
    const r = solver.solve(g, t, y, kt);
    y = r.y;
    t = kt;
  }
  return { product: y[0], activity: y[1] + y[2] };
}
