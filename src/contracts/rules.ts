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

/** Plausible reactor readings, °C. */
export const READING_MIN_C = -50;
export const READING_MAX_C = 250;
/** How far ahead of the server's clock a reading may be stamped (phone clocks drift), minutes. */
export const CLOCK_SKEW_MIN = 5;

export const MIN_PASSWORD_LENGTH = 12;

/** The page carries the session it was served for in a JSON block with this id, so the app starts without asking. */
export const PAGE_SESSION_ID = 'yieldpoint-session';

// Upper limits that keep every computed figure (profit per hour, cost of a batch) a finite number. Common
// practice, no source: the largest industrial fermenters hold about 1,000 m3, and no enzyme or product sells
// for a million per kilogram.
export const MAX_PRICE_PER_KG = 1e6;
export const MAX_HEATING_COST_PER_DEGC_H = 1e6;
export const MAX_VESSEL_VOLUME_L = 1e6;
