import { z } from 'zod';
import { Role } from './roles';
import { MIN_PASSWORD_LENGTH } from './rules';

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

/** A password someone chooses: at least MIN_PASSWORD_LENGTH characters and at most bcrypt's 72 bytes. */
export const NewPassword = SignInRequest.shape.password.refine((p) => p.length >= MIN_PASSWORD_LENGTH, `At least ${MIN_PASSWORD_LENGTH} characters`);

/** POST /api/session/password: your own password; the current one is needed, and your other sessions end. */
export const ChangePassword = z.strictObject({ currentPassword: z.string().min(1, 'Enter your current password').max(200), newPassword: NewPassword });
export type ChangePassword = z.infer<typeof ChangePassword>;

/** The token of a reset link an admin had mailed (in the body, kept out of logs). */
export const PasswordResetToken = z.strictObject({ token: z.string().min(20).max(2000) });
export const PasswordReset = PasswordResetToken.extend({ password: NewPassword });
export type PasswordReset = z.infer<typeof PasswordReset>;
export const PasswordResetPreview = z.object({ email: z.string(), expiresAt: z.string() });
export type PasswordResetPreview = z.infer<typeof PasswordResetPreview>;
export const PasswordResetSent = z.object({ to: z.string(), expiresAt: z.string() });
/** POST /api/users/:id/password-reset takes no fields. */
export const SendPasswordReset = z.strictObject({});
