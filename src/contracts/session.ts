import { z } from 'zod';
import { Role } from './roles';

export const SignInRequest = z.strictObject({
  email: z.string().trim().toLowerCase().email('Enter an e-mail address').max(254),
  // bcrypt reads only the first 72 bytes; longer passwords would be silently truncated.
  password: z
    .string()
    .min(1, 'Enter your password')
    .refine((p) => new TextEncoder().encode(p).length <= 72, 'Passwords are at most 72 bytes'),
});
export type SignInRequest = z.infer<typeof SignInRequest>;

export const SessionUser = z.object({
  id: z.number().int(),
  email: z.string(),
  name: z.string(),
  role: Role,
  siteId: z.number().int(),
  siteName: z.string(),
  siteTimeZone: z.string(),
  siteCurrency: z.string(),
  cautionsAcknowledgedAt: z.string().nullable(),
});
export type SessionUser = z.infer<typeof SessionUser>;

export const Session = z.object({ user: SessionUser });
export type Session = z.infer<typeof Session>;

/** GET /api/session: who is signed in, `user: null` when nobody is (not an error: the app asks on every load). */
export const SessionState = z.object({ user: SessionUser.nullable() });
export type SessionState = z.infer<typeof SessionState>;

export const UpdateMe = z.strictObject({ cautionsAcknowledged: z.literal(true) });
export type UpdateMe = z.infer<typeof UpdateMe>;
