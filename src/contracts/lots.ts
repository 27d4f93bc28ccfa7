import { z } from 'zod';

export const LOT_STATUSES = ['quarantined', 'accepted', 'rejected'] as const;
export const LotStatus = z.enum(LOT_STATUSES);
export type LotStatus = z.infer<typeof LotStatus>;

/** The stability figure in the form the supplier's certificate states it. */
export const CertStability = z.discriminatedUnion('form', [
  z.object({ form: z.literal('halfLife'), tempC: z.number(), halfLifeH: z.number().positive() }),
  z.object({ form: z.literal('residual'), tempC: z.number(), minutes: z.number().positive(), residualFraction: z.number().gt(0).lt(1) }),
  z.object({ form: z.literal('dValue'), tempC: z.number(), dMinutes: z.number().positive(), zC: z.number().positive() }),
]);
export type CertStability = z.infer<typeof CertStability>;

export const Lot = z.object({
  id: z.number().int(),
  enzymeId: z.number().int(),
  enzymeName: z.string(),
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

export const LotList = z.object({ lots: z.array(Lot) });
export type LotList = z.infer<typeof LotList>;
