import { economics, type EconomicsParams } from '../model/economics';
import { optimizeProfile, optimizeSetpoint, stagesWithRamps } from '../model/optimise';
import { pressureCaution } from '../model/safety';
import { simulate } from '../model/batch';
import type { EnzymeParams, Reading, SimulationResult, Stage, Substrate } from '../model/types';
import type { PlanInputs, PlanOutputs } from '../contracts/plans';
import { enzymeFor, type PlanContext } from './context';
import { conversionCompleteAtH, earlyFinish } from './early-finish';

/** A temperature program as the vessel would run it: stages joined by ramps at its heating and cooling rates. */
export type RunProgram = { stages: Stage[]; log: Reading[]; sim: SimulationResult };

/** One evaluation of a plan's inputs: its outputs plus the pieces the charts reuse. */
export type PlanEvaluation = {
  outputs: Omit<PlanOutputs, 'uncertainty'>;
  enzyme: EnzymeParams;
  substrate: Substrate;
  econ: EconomicsParams;
  boundsC: [number, number];
  isothermal: RunProgram;
  staged: RunProgram;
  current: RunProgram;
  plan: RunProgram;
};

export const substrateOf = (inputs: Pick<PlanInputs, 's0GPerL' | 'kmGPerL'>): Substrate => ({
  s0GPerL: inputs.s0GPerL,
  kmGPerL: inputs.kmGPerL,
});

/** The recipe's money in the engine's terms: the enzyme is charged per batch, heating counts from the fill temperature. */
export function economicsOf(ctx: PlanContext, inputs: PlanInputs): EconomicsParams {
  return {
    productPricePerKg: inputs.productPricePerKg,
    volumeL: ctx.vessel.workingVolumeL,
    enzymeCostPerBatch: ((inputs.doseGPerL * ctx.vessel.workingVolumeL) / 1000) * inputs.enzymePricePerKg,
    heatingCostPerDegCHour: inputs.heatingCostPerDegCHour,
    ambientC: ctx.fillC,
    turnaroundH: inputs.turnaroundH,
  };
}

function run(ctx: PlanContext, enzyme: EnzymeParams, substrate: Substrate, batchH: number, stages: Stage[]): RunProgram {
  const log = stagesWithRamps(stages, ctx.fillC, ctx.vessel.maxHeatCPerH, ctx.vessel.maxCoolCPerH);
  return { stages, log, sim: simulate(enzyme, substrate, batchH, { log }) };
}

const gain = (a: number, b: number) => (b > 0 ? a / b - 1 : 0);

/** Recommends within the vessel's limits and predicts the batch with its ramps; pure, the same on client and server. */
export function evaluatePlan(ctx: PlanContext, inputs: PlanInputs): PlanEvaluation {
  const enzyme = enzymeFor(ctx, inputs.doseGPerL);
  const substrate = substrateOf(inputs);
  const { batchH } = inputs;
  const boundsC: [number, number] = [ctx.vessel.minC, ctx.vessel.maxC];
  const iso = optimizeSetpoint(enzyme, substrate, batchH, boundsC);
  const profile = optimizeProfile(enzyme, substrate, batchH, boundsC, inputs.stages, inputs.maxStepC);
  const current = run(ctx, enzyme, substrate, batchH, [{ hours: batchH, c: inputs.currentSetpointC }]);
  // Substrate used up before the end at the current setpoint: another setpoint gains nothing measurable, so the
  // recommendation keeps the current one (when the vessel allows it) and says when conversion completes instead.
  const currentInBounds = inputs.currentSetpointC >= boundsC[0] && inputs.currentSetpointC <= boundsC[1];
  const keepsCurrent = currentInBounds && conversionCompleteAtH(enzyme, substrate, batchH, current.log) !== null;
  const setpointC = keepsCurrent ? inputs.currentSetpointC : iso.setpointC;
  const isothermal = keepsCurrent ? current : run(ctx, enzyme, substrate, batchH, [{ hours: batchH, c: iso.setpointC }]);
  const staged = run(ctx, enzyme, substrate, batchH, profile.stages);
  const plan = inputs.strategy === 'staged' ? staged : isothermal;
  const econ = economicsOf(ctx, inputs);
  const planMoney = economics(enzyme, substrate, batchH, { log: plan.log }, econ);
  const currentMoney = economics(enzyme, substrate, batchH, { log: current.log }, econ);
  const temps = plan.stages.map((s) => s.c);
  const pressure = pressureCaution({ stages: plan.stages });
  const belowHygienicMin = Math.min(...temps) < ctx.vessel.hygienicMinC;
  // The optimisers are bounded, so this only fails if the engine misbehaves: then the plan says so.
  const withinLimits = temps.every((c) => c >= boundsC[0] - 1e-9 && c <= boundsC[1] + 1e-9);
  return {
    outputs: {
      strategy: inputs.strategy,
      setpointC,
      stages: inputs.strategy === 'staged' ? profile.stages : null,
      predictedProductGPerL: plan.sim.productGPerL,
      activityLeft: plan.sim.residualActivity,
      profitPerH: planMoney.profitPerH,
      current: {
        setpointC: inputs.currentSetpointC,
        productGPerL: current.sim.productGPerL,
        activityLeft: current.sim.residualActivity,
        profitPerH: currentMoney.profitPerH,
      },
      gainOverCurrent: gain(plan.sim.productGPerL, current.sim.productGPerL),
      stagedGain: gain(staged.sim.productGPerL, isothermal.sim.productGPerL),
      boundsC,
      atBound: keepsCurrent ? null : iso.atBound,
      constraintsMet: withinLimits && !belowHygienicMin,
      earlyFinish: earlyFinish(enzyme, substrate, batchH, plan.log, current.log, econ),
      cautions: {
        crossesBoiling: pressure.crossesBoiling,
        maxC: pressure.maxC,
        saturationKPa: pressure.saturationKPa,
        belowHygienicMin,
        hygienicMinC: ctx.vessel.hygienicMinC,
      },
      kinetics: {
        tRefC: enzyme.tRefC,
        vmaxRefGPerLH: enzyme.vmaxRef,
        eaKJPerMol: enzyme.eaKJPerMol,
        kdRefPerH: enzyme.kdRefPerH,
        edKJPerMol: enzyme.edKJPerMol,
        stabilitySource: ctx.stabilitySource,
        evidence: ctx.evidence,
      },
    },
    enzyme,
    substrate,
    econ,
    boundsC,
    isothermal,
    staged,
    current,
    plan,
  };
}
