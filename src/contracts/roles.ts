import { z } from 'zod';

export const ROLES = ['admin', 'engineer', 'supervisor', 'procurement', 'operator'] as const;
export const Role = z.enum(ROLES);
export type Role = z.infer<typeof Role>;

export const ROLE_LABELS: Record<Role, string> = {
  admin: 'Site admin',
  engineer: 'Process engineer',
  supervisor: 'Plant supervisor',
  procurement: 'Procurement',
  operator: 'Shift operator',
};
