import { z } from 'zod';
import { CHANGE_STATUSES, SIGNATURE_MEANINGS } from '../enums';
import { calendarDay } from './calendar-day';
import { Plan, PlanStage, PLAN_STRATEGIES } from './plans';

export { CHANGE_STATUSES, SIGNATURE_MEANINGS };
export type ChangeStatus = (typeof CHANGE_STATUSES)[number];
export type SignatureMeaning = (typeof SIGNATURE_MEANINGS)[number];

const isoDay = calendarDay('2026-12-15');

export const ChangeRequestInput = z.strictObject({
  planId: z.number().int().positive(),
  rationale: z.string().trim().min(10, 'Say why, in a sentence at least').max(2000),
  expectedEffect: z.string().trim().min(3, 'Say what you expect to change').max(1000),
  /** Site-local date from which batches use the plan. */
  effectiveFrom: isoDay,
});
export type ChangeRequestInput = z.infer<typeof ChangeRequestInput>;

export const SignatureInput = z.strictObject({
  /** Re-entered at the moment of signing; never stored. */
  password: z.string().min(1, 'Enter your password to sign').max(200),
  meaning: z.enum(SIGNATURE_MEANINGS),
  comment: z.string().trim().max(1000).default(''),
});
export type SignatureInput = z.infer<typeof SignatureInput>;

export const Signature = z.object({
  id: z.number().int(),
  printedName: z.string(),
  role: z.string(),
  meaning: z.enum(SIGNATURE_MEANINGS),
  comment: z.string(),
  signedAtUtc: z.string(),
  /** The same instant on the site's clock, e.g. "2026-12-01 09:00 CET (Europe/Berlin)". */
  signedAtSite: z.string(),
  siteTimeZone: z.string(),
  recordHash: z.string(),
});
export type Signature = z.infer<typeof Signature>;

export const ChangeRequestSummary = z.object({
  id: z.number().int(),
  recipeId: z.number().int(),
  recipeName: z.string(),
  vesselName: z.string(),
  planId: z.number().int(),
  proposedById: z.number().int(),
  proposedBy: z.string(),
  rationale: z.string(),
  expectedEffect: z.string(),
  effectiveFrom: z.string(),
  status: z.enum(CHANGE_STATUSES),
  recordHash: z.string(),
  createdAt: z.string(),
  decidedAt: z.string().nullable(),
  /** The request that superseded this one or made it stale. */
  supersededBy: z.number().int().nullable(),
  proposedSetpointC: z.number(),
});
export type ChangeRequestSummary = z.infer<typeof ChangeRequestSummary>;

export const ChangeRequestList = z.object({ changeRequests: z.array(ChangeRequestSummary) });
export type ChangeRequestList = z.infer<typeof ChangeRequestList>;

export const ChangeRequestQuery = z.object({ status: z.enum(CHANGE_STATUSES).optional() });
export type ChangeRequestQuery = z.infer<typeof ChangeRequestQuery>;

/** One side of the comparison; figures are null where the current setpoint has no stored plan behind it. */
export const SetpointSide = z.object({
  source: z.enum(['released-plan', 'recipe-setpoint', 'proposed-plan']),
  planId: z.number().int().nullable(),
  strategy: z.enum(PLAN_STRATEGIES),
  setpointC: z.number(),
  stages: z.array(PlanStage).nullable(),
  predictedProductGPerL: z.number().nullable(),
  p10GPerL: z.number().nullable(),
  p50GPerL: z.number().nullable(),
  p90GPerL: z.number().nullable(),
  activityLeft: z.number().nullable(),
  profitPerH: z.number().nullable(),
  constraintsMet: z.boolean().nullable(),
});
export type SetpointSide = z.infer<typeof SetpointSide>;

export const ChangeRequestDetail = ChangeRequestSummary.extend({
  siteTimeZone: z.string(),
  /** True when the stored plan and request still hash to `recordHash`; signing is refused otherwise. */
  isIntact: z.boolean(),
  current: SetpointSide,
  proposed: SetpointSide,
  plan: Plan,
  signatures: z.array(Signature),
});
export type ChangeRequestDetail = z.infer<typeof ChangeRequestDetail>;
