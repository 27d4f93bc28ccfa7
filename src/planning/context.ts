import { arrheniusFactor, type EnzymeParams } from '../model';
import type { Enzyme } from '../contracts/enzymes';
import type { PlanningLot, Recipe } from '../contracts/recipes';
import type { Vessel } from '../contracts/vessels';

/** Everything a plan is computed from besides the engineer's choices; built from stored records only. */
export type PlanContext = {
  tRefC: number;
  eaKJPerMol: number;
  /** First-order inactivation rate at tRefC, 1/h. */
  kdRefPerH: number;
  edKJPerMol: number;
  stabilitySource: 'certificate' | 'fit';
  /** Covariance of [ln kdRef, Ed] from an assay fit; null until the lot has one. */
  covariance: number[][] | null;
  /** The recipe's dose and the Vmax measured at it: Vmax scales in proportion to the dose. */
  recipeDoseGPerL: number;
  recipeVmaxRefGPerLH: number;
  vessel: Pick<Vessel, 'minC' | 'maxC' | 'maxHeatCPerH' | 'maxCoolCPerH' | 'hygienicMinC' | 'workingVolumeL'>;
  fillC: number;
};

/**
 * The lot's kd at the enzyme's reference temperature. The certificate states kd at its own temperature;
 * moving it to tRefC needs an inactivation activation energy, the recipe's Ed until an assay fit exists.
 */
export function kdAtReference(lot: Pick<PlanningLot, 'certKdPerH' | 'certTempC'>, tRefC: number, edKJPerMol: number): number {
  return lot.certKdPerH * arrheniusFactor(edKJPerMol, tRefC, lot.certTempC);
}

export function planContext(
  recipe: Pick<Recipe, 'doseGPerL' | 'vmaxRefGPerLH' | 'edKJPerMol' | 'fillC'>,
  enzyme: Pick<Enzyme, 'tRefC' | 'eaKJPerMol'>,
  lot: Pick<PlanningLot, 'certKdPerH' | 'certTempC'>,
  vessel: PlanContext['vessel'],
): PlanContext {
  return {
    tRefC: enzyme.tRefC,
    eaKJPerMol: enzyme.eaKJPerMol,
    kdRefPerH: kdAtReference(lot, enzyme.tRefC, recipe.edKJPerMol),
    edKJPerMol: recipe.edKJPerMol,
    stabilitySource: 'certificate',
    covariance: null,
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
    vmaxRef: (ctx.recipeVmaxRefGPerLH * doseGPerL) / ctx.recipeDoseGPerL,
    eaKJPerMol: ctx.eaKJPerMol,
    kdRefPerH: ctx.kdRefPerH,
    edKJPerMol: ctx.edKJPerMol,
  };
}

// Stated default when the lot has no fit: kdRef +-20 % (1 sd, log-normal) and Ed +-10 % (1 sd), independent.
// Common practice for certificate-only stability, no source; shown to the user beside the result.
export const DEFAULT_LN_KD_SD = 0.2;
export const DEFAULT_ED_REL_SD = 0.1;

/** Covariance of [ln kdRef, Ed (kJ/mol)] for the Monte Carlo: the fit's, else the stated default. */
export function parameterCovariance(ctx: PlanContext): { covariance: number[][]; source: 'fit' | 'default' } {
  if (ctx.covariance) return { covariance: ctx.covariance, source: 'fit' };
  const edSd = DEFAULT_ED_REL_SD * ctx.edKJPerMol;
  return {
    covariance: [
      [DEFAULT_LN_KD_SD ** 2, 0],
      [0, edSd * edSd],
    ],
    source: 'default',
  };
}
