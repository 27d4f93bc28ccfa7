import { z } from 'zod';
import { calendarDay } from './calendar-day';
import { Assay, HalfLifeEstimate } from './assays';
import { Enzyme } from './enzymes';
import { CERTIFICATE_MIME_TYPES, LOT_STATUSES } from '../enums';

export { LOT_STATUSES };

export const LotStatus = z.enum(LOT_STATUSES);
export type LotStatus = z.infer<typeof LotStatus>;

const positive = (what: string) => z.number({ error: 'Enter a number' }).positive(`${what} must be above 0`);
const certTemp = z.number({ error: 'Enter a number' }).min(-20, 'At least -20 °C').max(150, 'At most 150 °C');

/** The stability figure in the form the supplier's certificate states it. */
export const CertStability = z.discriminatedUnion('form', [
  z.object({ form: z.literal('halfLife'), tempC: certTemp, halfLifeH: positive('Half-life') }),
  z.object({
    form: z.literal('residual'),
    tempC: certTemp,
    minutes: positive('Hold time'),
    residualFraction: z.number({ error: 'Enter a number' }).gt(0, 'Above 0').lt(1, 'Below 1 (a fraction, not per cent)'),
  }),
  z.object({ form: z.literal('dValue'), tempC: certTemp, dMinutes: positive('D-value'), zC: positive('z-value') }),
]);
export type CertStability = z.infer<typeof CertStability>;
export type CertForm = CertStability['form'];

const isoDay = calendarDay('2026-11-28');

/** What procurement types when a lot arrives. */
export const LotInput = z
  .strictObject({
    enzymeId: z.number().int().positive(),
    lotCode: z.string().trim().min(1, 'Required').max(40, 'At most 40 characters'),
    receivedOn: isoDay,
    expiresOn: isoDay,
    quantityKg: positive('Quantity'),
    certActivity: positive('Activity'),
    certStability: CertStability,
  })
  .refine((l) => l.expiresOn > l.receivedOn, { path: ['expiresOn'], message: 'Must be after the received date' });
export type LotInput = z.infer<typeof LotInput>;

export const CertificateFile = z.object({
  fileName: z.string(),
  mimeType: z.enum(CERTIFICATE_MIME_TYPES),
  sizeBytes: z.number().int(),
  sha256: z.string(),
  uploadedAt: z.string(),
  uploadedBy: z.string(),
});
export type CertificateFile = z.infer<typeof CertificateFile>;

export const Lot = z.object({
  id: z.number().int(),
  enzymeId: z.number().int(),
  enzymeName: z.string(),
  /** The enzyme's activity unit, e.g. GAU/g: the certificate's activity is in it. */
  activityUnit: z.string(),
  lotCode: z.string(),
  receivedOn: z.string(),
  expiresOn: z.string(),
  quantityKg: z.number(),
  certActivity: z.number(),
  certStability: CertStability,
  certKdPerH: z.number(),
  certTempC: z.number(),
  status: LotStatus,
  decisionReason: z.string().nullable(),
  decidedAt: z.string().nullable(),
});
export type Lot = z.infer<typeof Lot>;

export const LotQuery = z.object({
  status: LotStatus.optional(),
  enzymeId: z.coerce.number().int().positive().optional(),
});
export type LotQuery = z.infer<typeof LotQuery>;

export const LotList = z.object({ lots: z.array(Lot) });
export type LotList = z.infer<typeof LotList>;

/** The certificate's figure turned into kd at its temperature, with the steps shown to the user. */
export const CertConversion = z.object({
  tempC: z.number(),
  kdPerH: z.number(),
  halfLifeH: z.number(),
  /** Inactivation activation energy implied by a z-value, when the certificate gives one. */
  edKJPerMol: z.number().nullable(),
  steps: z.array(z.string()),
});
export type CertConversion = z.infer<typeof CertConversion>;

/** The figure compared with the specification, and what it suggests. */
export const LotEvaluation = z.object({
  basis: z.enum(['assay', 'certificate', 'none']),
  specTempC: z.number(),
  specMinHalfLifeH: z.number(),
  specMinActivity: z.number(),
  /** The half-life compared with the specification: the lower 95 % bound of the assay fit, else the certificate's. */
  comparedH: z.number().nullable(),
  estimate: HalfLifeEstimate.nullable(),
  isActivityOk: z.boolean(),
  recommendation: z.enum(['accept', 'reject', 'assay-needed']),
  summary: z.string(),
});
export type LotEvaluation = z.infer<typeof LotEvaluation>;

export const LotDetail = z.object({
  lot: Lot,
  enzyme: Enzyme,
  conversion: CertConversion,
  certificate: CertificateFile.nullable(),
  assays: z.array(Assay),
  evaluation: LotEvaluation,
  /** The certificate's half-life outside the newest assay fit's 95 % interval, in words; null when they agree or there is no fit. */
  disagreement: z.string().nullable(),
  decidedBy: z.string().nullable(),
});
export type LotDetail = z.infer<typeof LotDetail>;

export const LotDecision = z.strictObject({
  decision: z.enum(['accept', 'reject']),
  reason: z.string().trim().min(5, 'Give a reason of at least 5 characters').max(500, 'At most 500 characters'),
});
export type LotDecision = z.infer<typeof LotDecision>;
