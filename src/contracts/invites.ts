import { z } from 'zod';
import { MIN_PASSWORD_LENGTH } from './rules';

export { MIN_PASSWORD_LENGTH };
import { Role } from './roles';
import { NewPassword, SignInRequest } from './session';

export const CreateInvite = z.strictObject({
  email: SignInRequest.shape.email,
  role: Role,
});
export type CreateInvite = z.infer<typeof CreateInvite>;

export const Invite = z.object({
  id: z.number().int(),
  email: z.string(),
  role: Role,
  createdAt: z.string(),
  expiresAt: z.string(),
});
export type Invite = z.infer<typeof Invite>;

export const InviteList = z.object({ invites: z.array(Invite) });
export type InviteList = z.infer<typeof InviteList>;

export const InviteToken = z.strictObject({ token: z.string().min(20, 'This invite link is not complete').max(200) });
export type InviteToken = z.infer<typeof InviteToken>;

/** What the set-password page shows before the invited person chooses a password. */
export const InvitePreview = z.object({ email: z.string(), role: Role, siteName: z.string(), expiresAt: z.string() });
export type InvitePreview = z.infer<typeof InvitePreview>;

export const AcceptInvite = InviteToken.extend({
  name: z.string().trim().min(1, 'Enter your name').max(120),
  password: NewPassword,
});
export type AcceptInvite = z.infer<typeof AcceptInvite>;

export const InviteAccepted = z.object({ email: z.string() });
export type InviteAccepted = z.infer<typeof InviteAccepted>;
