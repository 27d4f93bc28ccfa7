import { z } from 'zod';

export const Vessel = z.object({
  id: z.number().int(),
  name: z.string(),
  workingVolumeL: z.number(),
  minC: z.number(),
  maxC: z.number(),
  maxHeatCPerH: z.number(),
  maxCoolCPerH: z.number(),
  hygienicMinC: z.number(),
});
export type Vessel = z.infer<typeof Vessel>;

export const VesselList = z.object({ vessels: z.array(Vessel) });
export type VesselList = z.infer<typeof VesselList>;
