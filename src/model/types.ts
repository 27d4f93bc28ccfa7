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
  /** Two-fraction decay: this share of the activity decays by its own Arrhenius law; kdRefPerH and edKJPerMol apply to the rest. */
  stableFraction?: StableFraction;
}

/** The slowly decaying fraction of a two-fraction lot: share (0..1) of the activity at h = 0, its kd at tRefC (1/h) and Ed (kJ/mol). */
export interface StableFraction {
  share: number;
  kdRefPerH: number;
  edKJPerMol: number;
}

/** Substrate charge and Michaelis constant, g/L. */
export interface Substrate {
  s0GPerL: number;
  kmGPerL: number;
  /** Competitive product inhibition constant, g/L (absent: none). */
  kiGPerL?: number;
  /** Substrate inhibition constant, g/L (absent: none). */
  ksiGPerL?: number;
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
  /** Enzyme activity left, fraction 0..1 of the activity at h = 0. */
  activity: number;
  /** Two fractions: the stable fraction's part of `activity` (same unit); absent = split as at h = 0. */
  stableActivity?: number;
}

export interface SimulationResult {
  productGPerL: number;
  conversion: number;
  residualActivity: number;
  workGPerL: number;
  /** Two fractions only: the stable fraction's part of residualActivity. */
  stableActivity?: number;
}

export interface TrajectoryPoint {
  h: number;
  c: number;
  productGPerL: number;
  activity: number;
}
