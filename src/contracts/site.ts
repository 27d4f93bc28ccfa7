import { z } from 'zod';
import { Role } from './roles';

export const SiteSummary = z.object({
  id: z.number().int(),
  name: z.string(),
  timeZone: z.string(),
  currency: z.string(),
  counts: z.object({
    users: z.number().int(),
    activeUsers: z.number().int(),
    vessels: z.number().int(),
    enzymes: z.number().int(),
    lots: z.number().int(),
    quarantinedLots: z.number().int(),
  }),
  usersByRole: z.record(Role, z.number().int()),
});
export type SiteSummary = z.infer<typeof SiteSummary>;

/** The admin's site settings. The currency is an ISO 4217 code the runtime knows (prices are not converted). */
export const SitePatch = z.strictObject({
  currency: z
    .string()
    .trim()
    .toUpperCase()
    .regex(/^[A-Z]{3}$/, 'Use a three-letter ISO 4217 code, such as EUR')
    .refine((c) => Intl.supportedValuesOf('currency').includes(c), 'Not a currency this server knows'),
});
export type SitePatch = z.infer<typeof SitePatch>;
