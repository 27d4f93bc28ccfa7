import { ModelInputError } from './errors';
import {
  dValueFromKd,
  eaFromQ10,
  edFromZ,
  halfLifeFromKd,
  kdFromDValue,
  kdFromHalfLife,
  kdPerHFromResidual,
  q10FromEa,
  zFromEd,
  zFromEquivalentTimes,
} from './units';

/** A supplier's or handbook's statement, with the temperatures it needs (degC; times in h unless named). */
export type ConvertInput =
  | { kind: 'kd'; kdPerH: number }
  | { kind: 'halfLife'; halfLifeH: number }
  | { kind: 'dValue'; dValueH: number }
  | { kind: 'residual'; residual: number; minutes: number }
  | { kind: 'z'; zC: number; t1C: number; t2C: number }
  | { kind: 'ed'; edKJPerMol: number; t1C: number; t2C: number }
  | { kind: 'q10'; q10: number; t1C: number }
  | { kind: 'ea'; eaKJPerMol: number; t1C: number }
  | { kind: 'equivalentTimes'; t1C: number; time1: number; t2C: number; time2: number };

export type ConvertResult =
  | { kdPerH: number; halfLifeH: number; dValueH: number }
  | { zC: number; edKJPerMol: number; t1C: number; t2C: number }
  | { q10: number; eaKJPerMol: number; t1C: number; t2C: number };

function firstOrder(kd: number): ConvertResult {
  return { kdPerH: kd, halfLifeH: halfLifeFromKd(kd), dValueH: dValueFromKd(kd) };
}

/** Every related figure of one statement: kd <-> half-life <-> D; z <-> Ed between two temperatures; Q10 <-> Ea over t1C -> t1C + 10. */
export function convert(input: ConvertInput): ConvertResult {
  switch (input.kind) {
    case 'kd':
      return firstOrder(input.kdPerH);
    case 'halfLife':
      return firstOrder(kdFromHalfLife(input.halfLifeH));
    case 'dValue':
      return firstOrder(kdFromDValue(input.dValueH));
    case 'residual':
      return firstOrder(kdPerHFromResidual(input.residual, input.minutes));
    case 'z':
      return { zC: input.zC, edKJPerMol: edFromZ(input.zC, input.t1C, input.t2C), t1C: input.t1C, t2C: input.t2C };
    case 'ed':
      return { zC: zFromEd(input.edKJPerMol, input.t1C, input.t2C), edKJPerMol: input.edKJPerMol, t1C: input.t1C, t2C: input.t2C };
    case 'q10':
      return { q10: input.q10, eaKJPerMol: eaFromQ10(input.q10, input.t1C), t1C: input.t1C, t2C: input.t1C + 10 };
    case 'ea':
      return { q10: q10FromEa(input.eaKJPerMol, input.t1C), eaKJPerMol: input.eaKJPerMol, t1C: input.t1C, t2C: input.t1C + 10 };
    case 'equivalentTimes': {
      const z = zFromEquivalentTimes(input.t1C, input.time1, input.t2C, input.time2);
      return { zC: z, edKJPerMol: edFromZ(z, input.t1C, input.t2C), t1C: input.t1C, t2C: input.t2C };
    }
    default:
      throw new ModelInputError('kind', 'is not a known statement');
  }
}
