import { z } from 'zod';
import { MAX_VESSEL_VOLUME_L } from './rules';

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

const temperatureC = z.number().min(-20).max(250);

// Field rules on their own, so a PATCH can take any subset and the merged record is checked as a whole.
export const VesselFields = z.object({
  name: z.string().trim().min(1, 'Give the vessel a name').max(80),
  workingVolumeL: z
    .number()
    .positive('Must be more than 0')
    .max(MAX_VESSEL_VOLUME_L, `At most ${MAX_VESSEL_VOLUME_L.toLocaleString('en')} L`),
  minC: temperatureC,
  maxC: temperatureC,
  maxHeatCPerH: z.number().positive('Must be more than 0'),
  maxCoolCPerH: z.number().positive('Must be more than 0'),
  hygienicMinC: temperatureC,
});

/** A whole vessel: the range must be a range, and the hygienic minimum must lie inside it. */
export const VesselInput = VesselFields.strict().superRefine((v, ctx) => {
  if (!(v.minC < v.maxC)) ctx.addIssue({ code: 'custom', path: ['maxC'], message: 'Must be above the minimum temperature' });
  if (v.hygienicMinC < v.minC || v.hygienicMinC > v.maxC)
    ctx.addIssue({ code: 'custom', path: ['hygienicMinC'], message: 'Must lie between the minimum and maximum temperature' });
});
export type VesselInput = z.infer<typeof VesselInput>;

export const VesselPatch = VesselFields.partial()
  .strict()
  .refine((v) => Object.keys(v).length > 0, 'Nothing to change');
export type VesselPatch = z.infer<typeof VesselPatch>;
