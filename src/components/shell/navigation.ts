import { can, type Capability } from '../../contracts/permissions';
import type { Role } from '../../contracts/roles';
import type { IconName } from '../icons';

// Who sees a place is the permission table's `place.<name>` row. `inBar: false` places are reached from another
// screen, not from the bar.
export type NavItem = { name: string; href: string; label: string; icon: IconName; capability: Capability; inBar?: boolean };

// Order is the order on screen. Each role sees at most five, so the phone's bottom bar never crowds.
export const NAV_ITEMS: readonly NavItem[] = [
  { name: 'site', href: '/site', label: 'Site', icon: 'site', capability: 'place.site' },
  { name: 'planner', href: '/planner', label: 'Planner', icon: 'planner', capability: 'place.planner' },
  { name: 'sign-offs', href: '/sign-offs', label: 'Sign-offs', icon: 'signoffs', capability: 'place.sign-offs' },
  { name: 'lots', href: '/lots', label: 'Lots', icon: 'lots', capability: 'place.lots' },
  { name: 'batches', href: '/batches', label: 'Batches', icon: 'batches', capability: 'place.batches' },
  { name: 'billing', href: '/billing', label: 'Billing', icon: 'billing', capability: 'place.billing' },
  { name: 'audit', href: '/audit', label: 'Audit trail', icon: 'signoffs', capability: 'place.audit', inBar: false },
  { name: 'you', href: '/you', label: 'You', icon: 'you', capability: 'place.you' },
];

/** Where each role lands after signing in: the screen of its daily job. */
export const HOME: Record<Role, string> = {
  admin: '/site',
  engineer: '/planner',
  supervisor: '/sign-offs',
  procurement: '/lots',
  operator: '/batches',
};

export const navItemsFor = (role: Role) => NAV_ITEMS.filter((i) => i.inBar !== false && can(role, i.capability));

export const canSee = (role: Role, name: string) => NAV_ITEMS.some((i) => i.name === name && can(role, i.capability));
