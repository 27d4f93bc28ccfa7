import { z } from 'zod';

export const Enzyme = z.object({
  id: z.number().int(),
  name: z.string(),
  enzymeClass: z.string(),
  ecNumber: z.string(),
  supplier: z.string(),
  activityUnit: z.string(),
  unitDefinition: z.string(),
  tRefC: z.number(),
  eaKJPerMol: z.number(),
  specTempC: z.number(),
  specMinHalfLifeH: z.number(),
  specMinActivity: z.number(),
});
export type Enzyme = z.infer<typeof Enzyme>;

export const EnzymeList = z.object({ enzymes: z.array(Enzyme) });
export type EnzymeList = z.infer<typeof EnzymeList>;
