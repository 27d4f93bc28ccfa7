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

const text = (max: number) => z.string().trim().min(1, 'Required').max(max, `At most ${max} characters`);
// Temperatures an enzyme process can have; a kelvin or Fahrenheit figure typed by mistake falls outside.
const tempC = z.number({ error: 'Enter a number' }).min(-20, 'At least -20 °C').max(150, 'At most 150 °C');

/** What a user types to create an enzyme product. */
export const EnzymeInput = z.strictObject({
  name: text(80),
  enzymeClass: text(80),
  // EC numbers have four parts; the last may be '-' or a preliminary 'n1'.
  ecNumber: z
    .string()
    .trim()
    .regex(/^\d{1,2}\.\d{1,3}\.\d{1,3}\.(\d{1,4}|-|n\d{1,3})$/, 'Four parts, like 3.2.1.3'),
  supplier: text(80),
  activityUnit: text(30),
  unitDefinition: text(300),
  tRefC: tempC,
  eaKJPerMol: z.number({ error: 'Enter a number' }).min(5, 'At least 5 kJ/mol').max(200, 'At most 200 kJ/mol'),
  specTempC: tempC,
  specMinHalfLifeH: z.number({ error: 'Enter a number' }).positive('Must be above 0').max(100_000, 'At most 100,000 h'),
  specMinActivity: z.number({ error: 'Enter a number' }).min(0, 'Cannot be negative'),
});
export type EnzymeInput = z.infer<typeof EnzymeInput>;

export const EnzymeUpdate = EnzymeInput.partial().refine((v) => Object.keys(v).length > 0, 'Change at least one field');
export type EnzymeUpdate = z.infer<typeof EnzymeUpdate>;

export const ENZYME_SORTS = ['name', 'enzymeClass', 'supplier', 'specTempC', 'specMinHalfLifeH'] as const;
export const EnzymeSort = z.enum(ENZYME_SORTS);
export type EnzymeSort = z.infer<typeof EnzymeSort>;

/** Query of the enzyme table: free-text search over name, class, EC number and supplier. */
export const EnzymeQuery = z.object({
  q: z.string().trim().max(80).optional(),
  sort: EnzymeSort.default('name'),
  dir: z.enum(['asc', 'desc']).default('asc'),
  page: z.coerce.number().int().min(1).default(1),
  pageSize: z.coerce.number().int().min(1).max(200).default(50),
});
export type EnzymeQuery = z.infer<typeof EnzymeQuery>;

export const EnzymeList = z.object({
  enzymes: z.array(Enzyme),
  total: z.number().int(),
  page: z.number().int(),
  pageSize: z.number().int(),
});
export type EnzymeList = z.infer<typeof EnzymeList>;

/** One lot's half-life at the enzyme's specification temperature, for the drift chart. */
export const LotHistoryPoint = z.object({
  lotId: z.number().int(),
  lotCode: z.string(),
  receivedOn: z.string(),
  status: z.enum(['quarantined', 'accepted', 'rejected']),
  basis: z.enum(['assay', 'certificate', 'none']),
  halfLifeH: z.number().nullable(),
  lowerH: z.number().nullable(),
  upperH: z.number().nullable(),
});
export type LotHistoryPoint = z.infer<typeof LotHistoryPoint>;

export const EnzymeDetail = z.object({ enzyme: Enzyme, history: z.array(LotHistoryPoint) });
export type EnzymeDetail = z.infer<typeof EnzymeDetail>;
