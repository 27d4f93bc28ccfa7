// Plain constants of the API's rules, without zod: the contracts build their schemas on them, the server
// enforces them, and the web app imports them from here so zod stays out of its bundle.

import { ROLES } from '../enums';

export { ROLES };
export type RoleName = (typeof ROLES)[number];

export const ROLE_LABELS: Record<RoleName, string> = {
  admin: 'Site admin',
  engineer: 'Process engineer',
  supervisor: 'Plant supervisor',
  procurement: 'Procurement',
  operator: 'Shift operator',
};

/** Who may register and edit enzymes, lots and assays. */
export const LOT_EDITORS = ['procurement', 'engineer', 'admin'] as const satisfies readonly RoleName[];
/** Accepting or rejecting a lot is procurement's call (and the admin's). */
export const LOT_DECIDERS = ['procurement', 'admin'] as const satisfies readonly RoleName[];

/** Plausible reactor readings, °C. */
export const READING_MIN_C = -50;
export const READING_MAX_C = 250;
/** How far ahead of the server's clock a reading may be stamped (phone clocks drift), minutes. */
export const CLOCK_SKEW_MIN = 5;

export const BATCH_STARTERS = ['supervisor', 'engineer'] as const;
export const READING_LOGGERS = ['operator', 'supervisor', 'engineer'] as const;
export const BATCH_READERS = ['operator', 'supervisor', 'engineer', 'admin'] as const;
export const DEVIATION_ACKNOWLEDGERS = ['operator', 'supervisor'] as const;
export const DEVIATION_CLOSERS = ['supervisor'] as const;

export const MIN_PASSWORD_LENGTH = 12;

/** The page carries the session it was served for in a JSON block with this id, so the app starts without asking. */
export const PAGE_SESSION_ID = 'yieldpoint-session';

/** Who sees a recipe and lot's calibration and model quality, and who decides on it (accepts, leaves batches out). */
export const CALIBRATION_READERS = ['engineer', 'supervisor', 'admin'] as const satisfies readonly RoleName[];
export const CALIBRATION_DECIDERS = ['engineer'] as const satisfies readonly RoleName[];
/** The site's measurement spread for calibration is the admin's to set, on the Site screen. */
export const CALIBRATION_SETTINGS_EDITORS = ['admin'] as const satisfies readonly RoleName[];

// Upper limits that keep every computed figure (profit per hour, cost of a batch) a finite number. Common
// practice, no source: the largest industrial fermenters hold about 1,000 m3, and no enzyme or product sells
// for a million per kilogram.
export const MAX_PRICE_PER_KG = 1e6;
export const MAX_HEATING_COST_PER_DEGC_H = 1e6;
export const MAX_VESSEL_VOLUME_L = 1e6;
