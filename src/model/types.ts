/** Enzyme lot as the engine sees it; kJ/mol at this boundary, J/mol inside. */
export interface EnzymeParams {
  /** Reference temperature of vmaxRef and kdRefPerH, degC. */
  tRefC: number;
  /** Maximum rate at tRefC for the dose used, g/L/h. */
  vmaxRef: number;
  /** Activation energy of catalysis, kJ/mol. */
  eaKJPerMol: number;
  /** First-order inactivation rate constant at tRefC, 1/h. */
  kdRefPerH: number;
  /** Activation energy of inactivation, kJ/mol. */
  edKJPerMol: number;
  /** Equilibrium Model: active <-> inactive with Keq = 1 at teqC; kd then applies to the inactive fraction. */
  equilibrium?: { teqC: number; dHeqKJPerMol: number };
}

/** Substrate charge and Michaelis constant, g/L. */
export interface Substrate {
  s0GPerL: number;
  kmGPerL: number;
}

export interface Stage {
  hours: number;
  c: number;
}

export interface Reading {
  h: number;
  c: number;
}

/** One setpoint; stages (piecewise constant); or a log (linear between readings, last value held). */
export type TemperatureInput = { setpointC: number } | { stages: readonly Stage[] } | { log: readonly Reading[] };

/** State carried from one part of a batch to the next. */
export interface BatchState {
  /** Accumulated catalytic work X = integral of Vmax(T) a dt, g/L. */
  workGPerL: number;
  /** Enzyme activity left, fraction 0..1. */
  activity: number;
}

export interface SimulationResult {
  productGPerL: number;
  conversion: number;
  residualActivity: number;
  workGPerL: number;
}

export interface TrajectoryPoint {
  h: number;
  c: number;
  productGPerL: number;
  activity: number;
}
