import { arrheniusFactor } from '../model/kinetics';
import { halfLifeAt } from '../model/half-life';
import { halfLifeFromKd } from '../model/units';
import type { AssayFit } from '../contracts/assays';
import type { KineticsEvidence } from '../contracts/plans';
import type { PlanningLot, Recipe } from '../contracts/recipes';

/**
 * The lot's certificate kd moved to the enzyme's reference temperature. The certificate states kd at its own
 * temperature; moving it needs an inactivation activation energy, the recipe's Ed until an assay fit exists.
 */
export function kdAtReference(lot: Pick<PlanningLot, 'certKdPerH' | 'certTempC'>, tRefC: number, edKJPerMol: number): number {
  return lot.certKdPerH * arrheniusFactor(edKJPerMol, tRefC, lot.certTempC);
}

/** A fit moved to another reference temperature: ln kd(T) = ln kdRef - Ed x, so cov' = J cov J' with J = [[1, -x], [0, 1]]. */
function fitAt(fit: AssayFit, tRefC: number): { kdRefPerH: number; covariance: number[][] } {
  const kd = halfLifeAt(fit, tRefC).kdPerH;
  const x = -Math.log(kd / fit.kdRefPerH) / fit.edKJPerMol;
  const [[a, b], [, d]] = fit.covariance;
  const ab = b - x * d;
  return {
    kdRefPerH: kd,
    covariance: [
      [a - 2 * x * b + x * x * d, ab],
      [ab, d],
    ],
  };
}

// Stated default when the lot has no fit: kdRef +-20 % (1 sd, log-normal) and Ed +-10 % (1 sd), independent.
// Common practice for certificate-only stability, no source; shown to the user beside the result.
export const DEFAULT_LN_KD_SD = 0.2;
export const DEFAULT_ED_REL_SD = 0.1;
// Prior sd of ln vmaxScale before any batch: the plant's Vmax within about +-20 % (1 sd) of the recipe's figure.
// Common practice for a rate measured at bench scale, no source; stated with every calibration.
export const VMAX_SCALE_LN_SD = 0.2;

/** A lot as planning reads it; fit and calibration may be absent (a lot without either plans from its certificate). */
export type EvidenceLot = Pick<PlanningLot, 'certKdPerH' | 'certTempC'> & Partial<Pick<PlanningLot, 'fit' | 'calibration'>>;

/** The kinetics planning uses for a lot, with where they came from. */
export type LotKinetics = {
  kdRefPerH: number;
  edKJPerMol: number;
  vmaxScale: number;
  /** Covariance of [ln kdRef, Ed (kJ/mol)]: the fit's or the calibration's, else the stated default. */
  covariance: number[][];
  /** Sd of ln vmaxScale (0 without a calibration: the recipe's Vmax is then taken as stated). */
  lnVmaxScaleSd: number;
  evidence: KineticsEvidence;
};

const n3 = (x: number) => Number(x.toPrecision(3)).toString();
const date = (iso: string) => iso.slice(0, 10);
const c0 = (c: number) => `${Number(c.toFixed(1))} °C`;

/** The prior of a calibration: the assay fit (its covariance) or the certificate with the default spread. */
export function assayKinetics(
  recipe: Pick<Recipe, 'edKJPerMol'>,
  tRefC: number,
  lot: EvidenceLot,
): Omit<LotKinetics, 'evidence'> & { source: 'fit' | 'certificate'; text: string } {
  const fit = lot.fit?.fit;
  if (fit) {
    const h = halfLifeAt(fit, tRefC);
    const moved = fitAt(fit, tRefC);
    return {
      kdRefPerH: moved.kdRefPerH,
      edKJPerMol: fit.edKJPerMol,
      vmaxScale: 1,
      covariance: moved.covariance,
      lnVmaxScaleSd: 0,
      source: 'fit',
      text: `assay fit of ${date(lot.fit!.createdAt)}, ${fit.n} points, t½ ${n3(h.halfLifeH)} h (95 % ${n3(h.lowerH)}–${n3(h.upperH)} h) at ${c0(tRefC)}`,
    };
  }
  const kd = kdAtReference(lot, tRefC, recipe.edKJPerMol);
  const edSd = DEFAULT_ED_REL_SD * recipe.edKJPerMol;
  return {
    kdRefPerH: kd,
    edKJPerMol: recipe.edKJPerMol,
    vmaxScale: 1,
    covariance: [
      [DEFAULT_LN_KD_SD ** 2, 0],
      [0, edSd * edSd],
    ],
    lnVmaxScaleSd: 0,
    source: 'certificate',
    text: `certificate only, default spread (t½ ${n3(halfLifeFromKd(kd))} h at ${c0(tRefC)}, Ed ${n3(recipe.edKJPerMol)} kJ/mol from the recipe)`,
  };
}

/** The certificate's half-life against the fit's 95 % interval at the certificate's temperature, in words when they disagree. */
export function certificateDisagreement(lot: EvidenceLot): string | null {
  const fit = lot.fit?.fit;
  if (!fit) return null;
  const cert = halfLifeFromKd(lot.certKdPerH);
  const est = halfLifeAt(fit, lot.certTempC);
  if (cert >= est.lowerH && cert <= est.upperH) return null;
  const side = cert > est.upperH ? 'less stable than its certificate says' : 'more stable than its certificate says';
  return `The certificate's half-life of ${n3(cert)} h at ${c0(lot.certTempC)} lies outside the assay fit's 95 % interval (${n3(est.lowerH)}–${n3(est.upperH)} h): the lot is ${side}.`;
}

/**
 * The one source of a lot's planning kinetics: the accepted calibration for the recipe and lot, else the lot's
 * assay fit, else the certificate with the stated default spread. Planner, stored plans, batch programs,
 * corrective setpoints and the Monte Carlo all take their kinetics from here.
 */
export function lotKinetics(recipe: Pick<Recipe, 'edKJPerMol'>, tRefC: number, lot: EvidenceLot): LotKinetics {
  const prior = assayKinetics(recipe, tRefC, lot);
  const disagreement = certificateDisagreement(lot);
  const fitAssayId = prior.source === 'fit' ? lot.fit!.assayId : null;
  const cal = lot.calibration;
  // A calibration is used only on the evidence it started from: a newer assay fit makes it a prior of the past.
  if (cal && cal.fitAssayId === fitAssayId) {
    const cv = cal.covariance;
    const lnSd = Math.sqrt(cv[0][0]);
    const x = [cal.kdRefPerH * Math.exp(-1.959964 * lnSd), cal.kdRefPerH * Math.exp(1.959964 * lnSd)].map(halfLifeFromKd);
    return {
      kdRefPerH: cal.kdRefPerH,
      edKJPerMol: cal.edKJPerMol,
      vmaxScale: cal.vmaxScale,
      covariance: [
        [cv[0][0], cv[0][1]],
        [cv[1][0], cv[1][1]],
      ],
      lnVmaxScaleSd: Math.sqrt(cv[2][2]),
      evidence: {
        source: 'calibration',
        text: `calibration of ${date(cal.acceptedAt)} from ${cal.batchCount} closed batch${cal.batchCount === 1 ? '' : 'es'} (accepted by ${cal.acceptedBy}): t½ ${n3(halfLifeFromKd(cal.kdRefPerH))} h (95 % ${n3(x[1])}–${n3(x[0])} h) at ${c0(tRefC)}, Vmax × ${cal.vmaxScale.toFixed(3)}; prior: ${prior.text}`,
        fitAssayId,
        calibrationId: cal.id,
        vmaxScale: cal.vmaxScale,
        disagreement,
      },
    };
  }
  const { source, text, ...k } = prior;
  return { ...k, evidence: { source, text, fitAssayId, calibrationId: null, vmaxScale: 1, disagreement } };
}
