// A lot's stability in Yieldpoint's terms, on top of the kinetics engine: the certificate's figure as kd,
// the assay fit, and the comparison with the enzyme's specification. Pure; shared by server, seed and screens.
import type { AssayFit, HalfLifeEstimate } from './contracts/assays';
import type { Enzyme } from './contracts/enzymes';
import type { CertConversion, CertStability, LotEvaluation } from './contracts/lots';
import { edFromZ, halfLifeFromKd, kdFromDValue, kdFromHalfLife, kdPerHFromResidual, lethalRate } from './model/units';
import { halfLifeAt } from './model/half-life';

const n = (x: number, digits = 3) => Number(x.toPrecision(digits)).toString();

/** The certificate's stability figure as a first-order kd (1/h) at its temperature, with each step in words. */
export function certConversion(s: CertStability): CertConversion {
  switch (s.form) {
    case 'halfLife': {
      const kd = kdFromHalfLife(s.halfLifeH);
      return {
        tempC: s.tempC,
        kdPerH: kd,
        halfLifeH: s.halfLifeH,
        edKJPerMol: null,
        steps: [`kd = ln 2 / t½ = 0.693 / ${n(s.halfLifeH)} h = ${n(kd)} /h at ${n(s.tempC)} °C`],
      };
    }
    case 'residual': {
      const kd = kdPerHFromResidual(s.residualFraction, s.minutes);
      return {
        tempC: s.tempC,
        kdPerH: kd,
        halfLifeH: halfLifeFromKd(kd),
        edKJPerMol: null,
        steps: [
          `kd = −ln(residual) / time = −ln(${n(s.residualFraction)}) / ${n(s.minutes / 60)} h = ${n(kd)} /h at ${n(s.tempC)} °C`,
          `t½ = ln 2 / kd = ${n(halfLifeFromKd(kd))} h`,
        ],
      };
    }
    case 'dValue': {
      const dH = s.dMinutes / 60;
      const kd = kdFromDValue(dH);
      // One z-value spans a tenfold change of kd, so the pair (T, T + z) gives Ed exactly under Arrhenius.
      const ed = edFromZ(s.zC, s.tempC, s.tempC + s.zC);
      return {
        tempC: s.tempC,
        kdPerH: kd,
        halfLifeH: halfLifeFromKd(kd),
        edKJPerMol: ed,
        steps: [
          `kd = ln 10 / D = 2.303 / ${n(dH)} h = ${n(kd)} /h at ${n(s.tempC)} °C`,
          `t½ = ln 2 / kd = ${n(halfLifeFromKd(kd))} h`,
          `Ed = ln 10 · R · T · (T + z) / z = ${n(ed)} kJ/mol (z = ${n(s.zC)} °C)`,
        ],
      };
    }
  }
}

/** First-order kd (1/h) at the certificate's own temperature. */
export const certKdPerH = (s: CertStability): number => certConversion(s).kdPerH;

/** The certificate's half-life (h) at another temperature: only when it states a z-value, else null. */
export function certHalfLifeAt(s: CertStability, c: number): number | null {
  const conv = certConversion(s);
  if (c === s.tempC) return conv.halfLifeH;
  if (s.form !== 'dValue') return null;
  return halfLifeFromKd(conv.kdPerH * lethalRate(c, s.tempC, s.zC));
}

/** Half-life (h) at a temperature with its 95 % interval from a stored fit. */
export const fitHalfLifeAt = (fit: AssayFit, c: number): HalfLifeEstimate => halfLifeAt(fit, c);

/**
 * The lot against its enzyme's specification. With a fitted assay the lower 95 % bound is compared (a lot passes
 * only when the data say so with confidence); without one, the certificate's figure, labelled as such.
 */
export function evaluateLot(
  enzyme: Pick<Enzyme, 'specTempC' | 'specMinHalfLifeH' | 'specMinActivity' | 'activityUnit'>,
  lot: { certStability: CertStability; certActivity: number },
  fit: AssayFit | null,
): LotEvaluation {
  const spec = { specTempC: enzyme.specTempC, specMinHalfLifeH: enzyme.specMinHalfLifeH, specMinActivity: enzyme.specMinActivity };
  const isActivityOk = lot.certActivity >= enzyme.specMinActivity;
  const activityNote = isActivityOk
    ? ''
    : ` Certificate activity ${n(lot.certActivity)} ${enzyme.activityUnit} is below the ${n(enzyme.specMinActivity)} minimum.`;
  const at = `at ${n(enzyme.specTempC)} °C`;
  if (fit) {
    const est = fitHalfLifeAt(fit, enzyme.specTempC);
    const meets = est.lowerH >= enzyme.specMinHalfLifeH;
    const verdict = meets ? 'meets' : 'is below';
    return {
      ...spec,
      basis: 'assay',
      comparedH: est.lowerH,
      estimate: est,
      isActivityOk,
      recommendation: meets && isActivityOk ? 'accept' : 'reject',
      summary: `Assay fit: half-life ${n(est.halfLifeH)} h ${at} (95 % interval ${n(est.lowerH)}–${n(est.upperH)} h); the lower bound ${verdict} the ${n(enzyme.specMinHalfLifeH)} h specification.${activityNote}`,
    };
  }
  const cert = certHalfLifeAt(lot.certStability, enzyme.specTempC);
  if (cert === null) {
    return {
      ...spec,
      basis: 'none',
      comparedH: null,
      estimate: null,
      isActivityOk,
      recommendation: 'assay-needed',
      summary: `The certificate states stability at ${n(lot.certStability.tempC)} °C without a z-value, so it says nothing ${at}. Upload an assay.${activityNote}`,
    };
  }
  const meets = cert >= enzyme.specMinHalfLifeH;
  return {
    ...spec,
    basis: 'certificate',
    comparedH: cert,
    estimate: null,
    isActivityOk,
    recommendation: meets && isActivityOk ? 'accept' : 'reject',
    summary: `Certificate figure (no assay yet): half-life ${n(cert)} h ${at}, ${meets ? 'meets' : 'is below'} the ${n(enzyme.specMinHalfLifeH)} h specification.${activityNote}`,
  };
}
