import { optimalSetpointC } from '../model/optimise';
import { simulate, temperatureAt } from '../model/batch';
import { thermalDose } from '../model/dose';
import type { Reading as Point } from '../model/types';
import type { BatchProgram, BatchStatus, Corrective } from '../contracts/batches';

/**
 * The temperature history the engine integrates: the plan until the first reading (nothing was measured
 * before it), then the readings, linear between them. Readings must be sorted by h.
 */
export function loggedHistory(program: Pick<BatchProgram, 'log'>, readings: readonly Point[]): Point[] {
  if (!readings.length) return [];
  const first = readings[0].h;
  const before = program.log.filter((p) => p.h < first);
  return [...before, ...readings.map((r) => ({ h: r.h, c: r.c }))];
}

/** The planned temperature at batch time h (ramps included), degC. */
export const plannedAt = (program: Pick<BatchProgram, 'log'>, h: number) => temperatureAt({ log: program.log }, h);

// Too little time left to change the outcome: no corrective setpoint is offered (a tenth of the batch, at least 30 min).
export const recoverableH = (batchH: number) => Math.max(0.5, 0.1 * batchH);

/**
 * The best isothermal setpoint for the rest of the batch from the state at the last reading, within the
 * vessel's range and not below its hygienic minimum; null when too little time is left.
 */
export function correctiveSetpoint(
  program: BatchProgram,
  state: { workGPerL: number; activity: number },
  fromH: number,
  planForecastGPerL: number,
): Corrective | null {
  const remainingH = program.batchH - fromH;
  if (remainingH < recoverableH(program.batchH)) return null;
  const boundsC: [number, number] = [Math.max(program.vessel.minC, program.vessel.hygienicMinC), program.vessel.maxC];
  // Activity left scales the remaining work but not where its maximum lies, so the fresh-batch optimum over the remaining hours applies.
  const setpointC = optimalSetpointC(program.enzyme, remainingH, boundsC);
  const forecastGPerL = simulate(program.enzyme, program.substrate, remainingH, { setpointC }, state).productGPerL;
  return { setpointC, fromH, remainingH, forecastGPerL, planForecastGPerL, boundsC };
}

/** Activity left, product so far, thermal dose and the forecast if the plan is followed from the last reading on. */
export function batchStatus(program: BatchProgram, readings: readonly Point[], nowH: number, withCorrective = false): BatchStatus {
  const history = loggedHistory(program, readings);
  const dose = thermalDose(program.enzyme, program.substrate, history, { log: program.log }, program.batchH);
  const lastH = readings.length ? Math.min(program.batchH, Math.max(0, readings[readings.length - 1].h)) : 0;
  return {
    readings: readings.length,
    lastH,
    hoursLeft: Math.max(0, program.batchH - Math.max(0, nowH)),
    plannedNowC: plannedAt(program, Math.min(Math.max(0, nowH), program.batchH)),
    equivalentHAtRef: dose.equivalentHAtRef,
    refC: dose.refC,
    activityLeft: dose.residualActivity,
    productSoFarGPerL: dose.productGPerL,
    forecastGPerL: dose.forecastProductGPerL,
    forecastActivityLeft: dose.forecastResidualActivity,
    plannedProductGPerL: program.plannedProductGPerL,
    p10GPerL: program.p10GPerL,
    corrective: withCorrective ? correctiveSetpoint(program, dose.state, lastH, dose.forecastProductGPerL) : null,
  };
}

/** A status computed earlier with its clock-dependent figures (hours left, planned now) for batch hour `nowH`. */
export function statusAtHour(program: BatchProgram, status: BatchStatus, nowH: number): BatchStatus {
  return {
    ...status,
    hoursLeft: Math.max(0, program.batchH - Math.max(0, nowH)),
    plannedNowC: plannedAt(program, Math.min(Math.max(0, nowH), program.batchH)),
  };
}
