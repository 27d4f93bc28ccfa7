import { z } from 'zod';
import { ROLE_LABELS, ROLES } from './rules';

export { ROLE_LABELS, ROLES };

export const Role = z.enum(ROLES);
export type Role = z.infer<typeof Role>;
