import { z } from 'zod';
import { Role } from './roles';

export const SiteSummary = z.object({
  id: z.number().int(),
  name: z.string(),
  timeZone: z.string(),
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
