import type { EnzymeParams } from '../model/types';
import type { Enzyme } from '../contracts/enzymes';
import type { KineticsEvidence } from '../contracts/plans';
import type { Recipe } from '../contracts/recipes';
import type { Vessel } from '../contracts/vessels';
import { lotKinetics, type EvidenceLot } from './evidence';

/** Everything a plan is computed from besides the engineer's choices; built from stored records only. */
export type PlanContext = {
  tRefC: number;
  eaKJPerMol: number;
  /** First-order inactivation rate at tRefC, 1/h. */
  kdRefPerH: number;
  edKJPerMol: number;
  stabilitySource: KineticsEvidence['source'];
  /** Covariance of [ln kdRef, Ed (kJ/mol)]: the fit's or calibration's, else the stated default spread. */
  covariance: number[][];
  /** Multiplies the recipe's Vmax (an accepted calibration's catalytic scale; 1 otherwise) and its ln sd. */
  vmaxScale: number;
  lnVmaxScaleSd: number;
  evidence: KineticsEvidence;
  /** The recipe's dose and the Vmax measured at it: Vmax scales in proportion to the dose. */
  recipeDoseGPerL: number;
  recipeVmaxRefGPerLH: number;
  vessel: Pick<Vessel, 'minC' | 'maxC' | 'maxHeatCPerH' | 'maxCoolCPerH' | 'hygienicMinC' | 'workingVolumeL'>;
  fillC: number;
};

export function planContext(
  recipe: Pick<Recipe, 'doseGPerL' | 'vmaxRefGPerLH' | 'edKJPerMol' | 'fillC'>,
  enzyme: Pick<Enzyme, 'tRefC' | 'eaKJPerMol'>,
  lot: EvidenceLot,
  vessel: PlanContext['vessel'],
): PlanContext {
  const k = lotKinetics(recipe, enzyme.tRefC, lot);
  return {
    tRefC: enzyme.tRefC,
    eaKJPerMol: enzyme.eaKJPerMol,
    kdRefPerH: k.kdRefPerH,
    edKJPerMol: k.edKJPerMol,
    stabilitySource: k.evidence.source,
    covariance: k.covariance,
    vmaxScale: k.vmaxScale,
    lnVmaxScaleSd: k.lnVmaxScaleSd,
    evidence: k.evidence,
    recipeDoseGPerL: recipe.doseGPerL,
    recipeVmaxRefGPerLH: recipe.vmaxRefGPerLH,
    vessel: {
      minC: vessel.minC,
      maxC: vessel.maxC,
      maxHeatCPerH: vessel.maxHeatCPerH,
      maxCoolCPerH: vessel.maxCoolCPerH,
      hygienicMinC: vessel.hygienicMinC,
      workingVolumeL: vessel.workingVolumeL,
    },
    fillC: recipe.fillC,
  };
}

/** The engine's enzyme for a dose (g/L). */
export function enzymeFor(ctx: PlanContext, doseGPerL: number): EnzymeParams {
  return {
    tRefC: ctx.tRefC,
    vmaxRef: (ctx.recipeVmaxRefGPerLH * doseGPerL * ctx.vmaxScale) / ctx.recipeDoseGPerL,
    eaKJPerMol: ctx.eaKJPerMol,
    kdRefPerH: ctx.kdRefPerH,
    edKJPerMol: ctx.edKJPerMol,
  };
}

/** Covariance of [ln kdRef, Ed (kJ/mol)] for the Monte Carlo and where its spread came from. */
export function parameterCovariance(ctx: PlanContext): { covariance: number[][]; source: 'fit' | 'default' | 'calibration' } {
  return { covariance: ctx.covariance, source: ctx.stabilitySource === 'certificate' ? 'default' : ctx.stabilitySource };
}
