// The closed word lists the database stores and the API speaks, in one leaf module that imports nothing: the
// schema (db/) and the contracts (src/contracts) both read them, and the web app may too without pulling in zod,
// drizzle or db/. Appending a word is a migration-free change in SQLite (a text column) and a contract change.

export const ROLES = ['admin', 'engineer', 'supervisor', 'procurement', 'operator'] as const;

export const LOT_STATUSES = ['quarantined', 'accepted', 'rejected'] as const;
export const CERTIFICATE_MIME_TYPES = ['application/pdf', 'image/png', 'image/jpeg'] as const;
export const ASSAY_SOURCES = ['csv', 'table'] as const;
export const RESIDUAL_SCALES = ['fraction', 'percent'] as const;

export const PLAN_STRATEGIES = ['isothermal', 'staged'] as const;

// `superseded`: a newer request for the same recipe replaced it while it waited. `stale`: another request for the
// recipe was released, so what it compared against no longer runs. Both close it unsigned.
export const CHANGE_STATUSES = ['proposed', 'approved', 'rejected', 'superseded', 'stale'] as const;
export const SIGNATURE_MEANINGS = ['reviewed', 'approved', 'rejected'] as const;

export const PLAN_SOURCES = ['released_plan', 'current_setpoint'] as const;
export const BATCH_STATUSES = ['running', 'closed'] as const;
export const DEVIATION_KINDS = ['band', 'gap', 'vessel_max', 'forecast_low', 'signal_lost'] as const;
/** manual: typed on a phone; historian: a file import; control_system: read from the plant over OPC UA. */
export const READING_SOURCES = ['manual', 'historian', 'control_system'] as const;
export const DEVIATION_STATES = ['open', 'acknowledged', 'closed'] as const;

export const CALIBRATION_STATES = ['proposed', 'accepted', 'superseded'] as const;

export const SOURCE_UNITS = ['degC', 'K', 'degF'] as const;
export const SECURITY_POLICIES = ['Basic256Sha256', 'Aes128_Sha256_RsaOaep', 'Aes256_Sha256_RsaPss', 'None'] as const;
export const SECURITY_MODES = ['SignAndEncrypt', 'Sign', 'None'] as const;
