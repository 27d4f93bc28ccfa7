import { ROLES, type RoleName } from './rules';

// Who may do what, in one table: the API's guards (`allow(capability)` on every route), the navigation and the
// screens' buttons all read it. Plain data without zod, so the web bundle carries it. The order of a row's roles
// is the order the route tests try them in. tests/contracts/permissions.test.ts checks that every API route is
// guarded by a capability and that no role sees a place whose reads the API would refuse it.
const PERMISSIONS = {
  // Places in the navigation: who sees each one and may open it.
  'place.site': ['admin'],
  'place.planner': ['engineer', 'supervisor'],
  'place.sign-offs': ['supervisor', 'engineer', 'admin'],
  'place.lots': ['procurement', 'engineer', 'supervisor', 'admin'],
  'place.batches': ['operator', 'supervisor', 'engineer'],
  'place.billing': ['admin'],
  'place.audit': ['supervisor', 'admin'],
  'place.you': ROLES,

  // One's own session: the cautions notice, one's password, signing out.
  'session.own': ROLES,
  'site.read': ['admin', 'supervisor'],
  'site.edit': ['admin'],
  /** Users, their roles and password resets, and invites. */
  'people.manage': ['admin'],
  'mail-outbox.manage': ['admin'],
  'billing.manage': ['admin'],
  /** Read, verify and export the audit trail, and write a signed checkpoint of it. */
  'audit-events.review': ['supervisor', 'admin'],

  'enzymes.read': ROLES,
  'lots.read': ROLES,
  /** Register and edit enzymes, lots, certificates and assays. */
  'lots.edit': ['procurement', 'engineer', 'admin'],
  /** Accepting or rejecting a lot is procurement's call (and the admin's). */
  'lots.decide': ['procurement', 'admin'],
  'vessels.read': ROLES,
  'vessels.edit': ['engineer', 'admin'],
  'recipes.read': ROLES,
  'recipes.edit': ['engineer', 'admin'],
  'plans.read': ['engineer', 'supervisor', 'admin'],
  'plans.create': ['engineer'],
  'change-requests.read': ['engineer', 'supervisor', 'admin'],
  'change-requests.propose': ['engineer', 'supervisor'],
  'change-requests.sign': ['supervisor'],
  /** A recipe and lot's calibration and model quality. */
  'calibrations.read': ['engineer', 'supervisor', 'admin'],
  /** Accept a calibration, leave a batch out of it. */
  'calibrations.decide': ['engineer'],
  /** The site's measurement spread for calibration, set on the Site screen. */
  'calibrations.settings': ['admin'],

  /** Batches, their readings, deviations and reports, and the control-system link's status for them. */
  'batches.read': ['operator', 'supervisor', 'engineer', 'admin'],
  'batches.start': ['supervisor', 'engineer'],
  'batches.close': ['supervisor', 'engineer'],
  /** The site's deviation rules (band, gap). */
  'batches.settings': ['supervisor', 'admin'],
  /** Log a reading by hand or import a historian file. */
  'readings.log': ['operator', 'supervisor', 'engineer'],
  'deviations.acknowledge': ['operator', 'supervisor'],
  'deviations.close': ['supervisor'],
  /** Whether the site reads temperatures from its control system. */
  'control-link.read': ROLES,
  /** Sources, certificates, trust and settings of the control-system link. */
  'control-link.configure': ['admin'],
} as const satisfies Record<string, readonly RoleName[]>;

export type Capability = keyof typeof PERMISSIONS;

const TABLE: Readonly<Record<Capability, readonly RoleName[]>> = PERMISSIONS;

export const CAPABILITIES = Object.keys(TABLE) as Capability[];

/** Whether `role` may do `capability`. */
export const can = (role: RoleName, capability: Capability): boolean => TABLE[capability].includes(role);

/** The roles that may do `capability`, in the table's order. */
export const rolesWith = (capability: Capability): readonly RoleName[] => TABLE[capability];
