import type { Role } from '../../contracts/roles';
import type { IconName } from '../icons';

// `inBar: false` places are reached from another screen, not from the bar.
export type NavItem = { name: string; href: string; label: string; icon: IconName; roles: readonly Role[]; inBar?: boolean };

// Order is the order on screen. Each role sees at most five, so the phone's bottom bar never crowds.
export const NAV_ITEMS: readonly NavItem[] = [
  { name: 'site', href: '/site', label: 'Site', icon: 'site', roles: ['admin'] },
  { name: 'planner', href: '/planner', label: 'Planner', icon: 'planner', roles: ['engineer', 'supervisor'] },
  { name: 'sign-offs', href: '/sign-offs', label: 'Sign-offs', icon: 'signoffs', roles: ['supervisor', 'engineer', 'admin'] },
  { name: 'lots', href: '/lots', label: 'Lots', icon: 'lots', roles: ['procurement', 'engineer', 'supervisor', 'admin'] },
  { name: 'batches', href: '/batches', label: 'Batches', icon: 'batches', roles: ['operator', 'supervisor', 'engineer'] },
  { name: 'billing', href: '/billing', label: 'Billing', icon: 'billing', roles: ['admin'] },
  { name: 'audit', href: '/audit', label: 'Audit trail', icon: 'signoffs', roles: ['supervisor', 'admin'], inBar: false },
  { name: 'you', href: '/you', label: 'You', icon: 'you', roles: ['admin', 'engineer', 'supervisor', 'procurement', 'operator'] },
];

/** Where each role lands after signing in: the screen of its daily job. */
export const HOME: Record<Role, string> = {
  admin: '/site',
  engineer: '/planner',
  supervisor: '/sign-offs',
  procurement: '/lots',
  operator: '/batches',
};

export const navItemsFor = (role: Role) => NAV_ITEMS.filter((i) => i.inBar !== false && i.roles.includes(role));

export const canSee = (role: Role, name: string) => NAV_ITEMS.some((i) => i.name === name && i.roles.includes(role));
