import { z } from 'zod';
import { Role } from './roles';

export const User = z.object({
  id: z.number().int(),
  email: z.string(),
  name: z.string(),
  role: Role,
  isActive: z.boolean(),
  createdAt: z.string(),
});
export type User = z.infer<typeof User>;

export const UserList = z.object({ users: z.array(User) });
export type UserList = z.infer<typeof UserList>;

export const UpdateUser = z
  .strictObject({ role: Role.optional(), isActive: z.boolean().optional(), name: z.string().trim().min(1).max(120).optional() })
  .refine((v) => Object.keys(v).length > 0, 'Nothing to change');
export type UpdateUser = z.infer<typeof UpdateUser>;
